import { requirePositive, TrainingInputError } from "./errors";

/*
 * Daniels & Gilbert (1979), "Oxygen Power: Performance Tables for Distance Runners", with v in m/min and t in min:
 *   oxygen cost        VO2(v) = −4.60 + 0.182258 v + 0.000104 v²       (ml/kg/min)
 *   fraction sustained %(t)  = 0.8 + 0.1894393 e^(−0.012778 t) + 0.2989558 e^(−0.1932605 t)
 *   running index            = VO2(v) / %(t)
 */

const cost = (vMpm: number) => -4.6 + 0.182258 * vMpm + 0.000104 * vMpm * vMpm;
const fraction = (tMin: number) =>
  0.8 + 0.1894393 * Math.exp(-0.012778 * tMin) + 0.2989558 * Math.exp(-0.1932605 * tMin);

/** Race distances the formula was fitted on: roughly 1500 m to the marathon and a bit beyond. */
const MIN_DISTANCE = 800;
const MAX_DISTANCE = 50_000;

/** Running index (the Daniels–Gilbert oxygen-power value) from one race: distance in metres, time in seconds. */
export function runningIndex(distanceM: number, timeS: number): number {
  const d = requirePositive(distanceM, "Race distance (m)");
  const t = requirePositive(timeS, "Race time (s)");
  if (d < MIN_DISTANCE || d > MAX_DISTANCE) {
    throw new TrainingInputError("out_of_range", "Use a race between 800 m and 50 km for a running index.");
  }
  const tMin = t / 60;
  const v = d / tMin;
  if (v < 80 || v > 450) {
    throw new TrainingInputError(
      "out_of_range",
      "That pace is outside what the running-index formula covers; check distance and time.",
    );
  }
  return cost(v) / fraction(tMin);
}

/**
 * Predicted race time (s) for a running index and distance, by bisection on time: the index falls as time rises,
 * so the root is unique. Tolerance 1 µs.
 */
export function raceTimeForIndex(index: number, distanceM: number): number {
  const vdot = requirePositive(index, "Running index", 90);
  const d = requirePositive(distanceM, "Race distance (m)");
  if (vdot < 15) throw new TrainingInputError("out_of_range", "Running index must be at least 15.");
  if (d < MIN_DISTANCE || d > MAX_DISTANCE) {
    throw new TrainingInputError("out_of_range", "Use a distance between 800 m and 50 km.");
  }
  const indexAt = (tS: number) => cost(d / (tS / 60)) / fraction(tS / 60);
  let lo = (d / 450) * 60; // fastest pace covered (s)
  let hi = (d / 60) * 60; // slower than any runner the formula describes
  if (indexAt(lo) < vdot || indexAt(hi) > vdot) {
    throw new TrainingInputError(
      "out_of_range",
      "That running index is outside what the formula covers for this distance.",
    );
  }
  for (let i = 0; i < 200 && hi - lo > 1e-6; i++) {
    const mid = (lo + hi) / 2;
    if (indexAt(mid) > vdot) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Threshold pace (s per km) for a running index: the speed whose oxygen cost is 88 % of the index, solved from the
 * cost quadratic. Source: Daniels J, Daniels' Running Formula (threshold intensity at about 88 % of the index).
 */
export function thresholdPaceForIndex(index: number): number {
  const vdot = requirePositive(index, "Running index", 90);
  if (vdot < 15) throw new TrainingInputError("out_of_range", "Running index must be at least 15.");
  const target = 0.88 * vdot;
  const a = 0.000104;
  const b = 0.182258;
  const c = -4.6 - target;
  const v = (-b + Math.sqrt(b * b - 4 * a * c)) / (2 * a); // m/min
  return (1000 / v) * 60;
}

/** Speed (m/min) whose oxygen cost is `vo2` ml/kg/min, from the cost quadratic above. */
function speedForCost(vo2: number): number {
  const a = 0.000104;
  const b = 0.182258;
  const c = -4.6 - vo2;
  return (-b + Math.sqrt(b * b - 4 * a * c)) / (2 * a);
}

export interface TrainingPaces {
  /** Seconds per km; easy is a range (slower, faster). */
  easy: { slowS: number; fastS: number };
  marathon: number;
  threshold: number;
  interval: number;
  repetition: number;
}

/**
 * Training paces for a running index, after Daniels J, Daniels' Running Formula (intensities as fractions of the
 * index): easy 59–74 %, marathon = the predicted marathon race pace, threshold 88 %, interval 97.5 % (about the
 * pace held for 10–12 minutes), repetition = the interval pace per 400 m less 6 s (the book's rule of thumb; from
 * memory). Seconds per km, unrounded; checked against the book's table in tests/unit/running-paces.test.ts.
 */
export function trainingPaces(index: number): TrainingPaces {
  const vdot = requirePositive(index, "Running index", 90);
  if (vdot < 30)
    throw new TrainingInputError("out_of_range", "Training paces are given for a running index of 30 and above.");
  const perKm = (vMpm: number) => (1000 / vMpm) * 60;
  const interval = perKm(speedForCost(0.975 * vdot));
  return {
    easy: { slowS: perKm(speedForCost(0.59 * vdot)), fastS: perKm(speedForCost(0.74 * vdot)) },
    marathon: raceTimeForIndex(vdot, 42195) / 42.195,
    threshold: thresholdPaceForIndex(vdot),
    interval,
    repetition: (interval * 0.4 - 6) / 0.4,
  };
}
