/**
 * What one 1 Hz activity shows: best efforts and the power curve, ramp detection, pacing thirds, heart-rate drift and
 * time in zones or targets. Over 300 lines because all are short reads of the same series sharing powerOf and the
 * prefix-sum window helpers; grouped any finer, the modules would be a few dozen lines each.
 */
import type { Sample } from "./activity";
import { requirePositive, TrainingInputError } from "./errors";

type Series = readonly Sample[];

/** Power at 1 Hz, with missing readings as 0; throws when the file has no power at all. */
export function powerOf(series: Series): Float64Array {
  if (!series.length) throw new TrainingInputError("empty_file", "The activity has no samples.");
  if (!series.some((s) => typeof s.power === "number")) {
    throw new TrainingInputError(
      "no_power",
      "This file has no power readings; a power test needs a power meter's data.",
    );
  }
  const out = new Float64Array(series.length);
  for (let i = 0; i < series.length; i++) out[i] = series[i].power ?? 0;
  return out;
}

function prefixSums(values: Float64Array): Float64Array {
  const prefix = new Float64Array(values.length + 1);
  for (let i = 0; i < values.length; i++) prefix[i + 1] = prefix[i] + values[i];
  return prefix;
}

function checkWindow(windowS: number, length: number) {
  requirePositive(windowS, "Window (s)");
  if (!Number.isInteger(windowS))
    throw new TrainingInputError("out_of_range", "The window must be a whole number of seconds.");
  if (windowS > length) {
    throw new TrainingInputError("too_short", `The activity (${length} s) is shorter than the ${windowS} s window.`);
  }
}

function bestFromPrefix(prefix: Float64Array, windowS: number): { startS: number; mean: number } {
  let best = -1;
  let start = 0;
  for (let i = 0; i + windowS < prefix.length; i++) {
    const sum = prefix[i + windowS] - prefix[i];
    if (sum > best) {
      best = sum;
      start = i;
    }
  }
  return { startS: start, mean: best / windowS };
}

/** The highest mean power over any window of `windowS` seconds, in O(n) with prefix sums. */
export function meanMaximal(series: Series, windowS: number): number {
  const power = powerOf(series);
  checkWindow(windowS, power.length);
  return bestFromPrefix(prefixSums(power), windowS).mean;
}

/** Where the best window starts (s from the start of the file) and its mean power. */
export function bestEffort(series: Series, windowS: number): { startS: number; mean: number } {
  const power = powerOf(series);
  checkWindow(windowS, power.length);
  return bestFromPrefix(prefixSums(power), windowS);
}

export const STANDARD_WINDOWS_S = [
  1, 5, 10, 15, 20, 30, 45, 60, 90, 120, 180, 240, 300, 360, 480, 600, 720, 900, 1200, 1800, 2400, 3600,
] as const;

/** Mean-maximal power for each window that fits in the activity (windows longer than it are left out). */
export function powerCurve(
  series: Series,
  windowsS: readonly number[] = STANDARD_WINDOWS_S,
): { windowS: number; watts: number }[] {
  const power = powerOf(series);
  const prefix = prefixSums(power);
  return windowsS
    .filter((w) => Number.isInteger(w) && w > 0 && w <= power.length)
    .map((w) => ({ windowS: w, watts: bestFromPrefix(prefix, w).mean }));
}

/** Mechanical work in kilojoules: the sum of 1 Hz power readings (joules) / 1000. */
export function workKj(series: Series): number {
  const power = powerOf(series);
  let sum = 0;
  for (const p of power) sum += p;
  return sum / 1000;
}

export interface RampDetection {
  /** Rise from one step to the next (W). */
  stepW: number;
  /** Length of each step (s). */
  stepS: number;
  /** Ramp rate, W per minute: stepW × 60 / stepS. */
  rateWPerMin: number;
  /** Completed steps (the step the rider failed in is not counted). */
  steps: number;
  /** Mean power of the first and of the last completed step (W). */
  firstStepW: number;
  lastCompletedStepW: number;
  /** Seconds ridden into the step where the rider stopped (0 when the ride ended on a step change). */
  failedIntoStepS: number;
  /** The first step's start, the end of the last completed step, and where the rider stopped (s from file start). */
  startS: number;
  lastCompletedEndS: number;
  endS: number;
  bestOneMinuteW: number;
}

/** Step lengths tried, in seconds: the usual ramp protocols step every 15 s to 5 min (common practice). */
const RAMP_STEP_LENGTHS_S = [15, 20, 30, 45, 60, 90, 120, 150, 180, 240, 300] as const;
/** A rise counts as one more step of the ramp when it lies within ±35 % of the ramp's typical rise (our rule). */
const STEP_REGULARITY = 0.35;

/**
 * Finds a ramp test: equal power steps of equal length, rising to exhaustion.
 *
 * The rider stops where the best minute ends (or a little later while power holds). Every step length from
 * RAMP_STEP_LENGTHS_S and every phase of the step grid against that stop is tried; the grid whose steps are
 * flattest inside (smallest pooled within-step spread) wins, and on a tie the longer step (a 60 s ramp is also
 * flat on a 30 s grid, but then every other rise is zero and the run breaks). Walking back from the stop, a step
 * belongs to the ramp while its rise over the step before lies within ±35 % of the typical rise; the warm-up
 * fails that test (it is flat, or far below the first step) and is left out, and so is a lone "step" at the
 * warm-up's own level. A step the rider failed part-way
 * through is reported as `failedIntoStepS`, not counted as a step. At least five rising steps are needed.
 */
export function detectRampTest(series: Series): RampDetection {
  const power = powerOf(series);
  if (power.length < 300) throw new TrainingInputError("too_short", "A ramp test needs at least 5 minutes of data.");
  const prefix = prefixSums(power);
  const squares = prefixSums(power.map((p) => p * p));
  const best = bestFromPrefix(prefix, 60);
  // Extend past the best minute while the rider still holds its power (a strong last few seconds).
  let endS = best.startS + 60;
  while (endS < power.length && power[endS] >= 0.9 * best.mean) endS++;

  const meanOf = (a: number, b: number) => (prefix[b] - prefix[a]) / (b - a);
  const ssOf = (a: number, b: number) => squares[b] - squares[a] - (prefix[b] - prefix[a]) ** 2 / (b - a);

  type Candidate = { stepS: number; boundary: number; means: number[]; rise: number; sd: number };
  let winner: Candidate | null = null;
  for (const stepS of RAMP_STEP_LENGTHS_S) {
    // The last step change lies within one step before the stop; try each second of it.
    for (let boundary = endS; boundary > endS - stepS && boundary - 6 * stepS >= 0; boundary--) {
      const count = Math.floor(boundary / stepS);
      const means = new Array<number>(count);
      for (let j = 0; j < count; j++) {
        const end = boundary - (count - 1 - j) * stepS;
        means[j] = meanOf(end - stepS, end);
      }
      const rises = means.slice(1).map((m, i) => m - means[i]);
      if (rises.length < 4) continue;
      // The steps nearest the stop are ramp by construction: their median rise is the reference.
      const rise = median(rises.slice(-5));
      if (!(rise > 0)) continue;
      let k = rises.length - 1;
      while (k >= 0 && Math.abs(rises[k] - rise) <= STEP_REGULARITY * rise) k--;
      // A first "step" at the level of the minute before it is the end of a flat warm-up, not the ramp.
      const first = k >= 0 && Math.abs(rises[k]) < STEP_REGULARITY * rise ? k + 2 : k + 1;
      const run = means.slice(first);
      // A ramp to exhaustion climbs: at least 2 W a step and a fifth above where it began (our rule), so the
      // small regular ripples of steady riding are not mistaken for one.
      if (run.length < 5 || rise < 2 || run[run.length - 1] < 1.2 * run[0]) continue;
      let ss = 0;
      for (let j = 0; j < run.length; j++) {
        const end = boundary - (run.length - 1 - j) * stepS;
        ss += ssOf(end - stepS, end);
      }
      const sd = Math.sqrt(ss / (run.length * stepS));
      const better = !winner || sd < winner.sd * 0.97 || (sd <= winner.sd * 1.03 && stepS > winner.stepS);
      if (better) winner = { stepS, boundary, means: run, rise, sd };
    }
  }
  if (!winner)
    throw new TrainingInputError(
      "not_a_ramp",
      "No ramp of at least five equal rising steps was found before the best minute.",
    );
  const { stepS, boundary, means } = winner;
  const rises = means.slice(1).map((m, i) => m - means[i]);
  const stepW = rises.reduce((s, r) => s + r, 0) / rises.length;
  return {
    stepW,
    stepS,
    rateWPerMin: (stepW * 60) / stepS,
    steps: means.length,
    firstStepW: means[0],
    lastCompletedStepW: means[means.length - 1],
    failedIntoStepS: endS - boundary,
    startS: boundary - means.length * stepS,
    lastCompletedEndS: boundary,
    endS,
    bestOneMinuteW: best.mean,
  };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

export type PacingVerdict = "even" | "rising" | "fading";

/** Within ±3 % of the window's mean between first and last part counts as even (common practice). */
export const EVEN_PACING_PCT = 3;

/**
 * Splits a test window into equal parts and judges the pacing from the first and last part: even, rising
 * (negative split) or fading.
 */
export function pacingSplits(
  series: Series,
  startS: number,
  windowS: number,
  parts = 3,
): { means: number[]; changePct: number; verdict: PacingVerdict } {
  const power = powerOf(series);
  if (!Number.isInteger(startS) || startS < 0)
    throw new TrainingInputError("out_of_range", "The window start must be a whole second from 0.");
  checkWindow(windowS, power.length - startS);
  if (!Number.isInteger(parts) || parts < 2 || parts > windowS)
    throw new TrainingInputError("out_of_range", "Split the window into 2 or more parts.");
  const prefix = prefixSums(power);
  const means: number[] = [];
  for (let k = 0; k < parts; k++) {
    const a = startS + Math.round((k * windowS) / parts);
    const b = startS + Math.round(((k + 1) * windowS) / parts);
    means.push((prefix[b] - prefix[a]) / (b - a));
  }
  const overall = (prefix[startS + windowS] - prefix[startS]) / windowS;
  const changePct = overall > 0 ? ((means[parts - 1] - means[0]) / overall) * 100 : 0;
  const verdict: PacingVerdict = Math.abs(changePct) <= EVEN_PACING_PCT ? "even" : changePct > 0 ? "rising" : "fading";
  return { means, changePct, verdict };
}

/**
 * What a pacing verdict means for the result, in our words; null for even pacing. The figure is the last part
 * against the first, in % of the window's mean (as `pacingSplits` gives it).
 */
export function pacingAdvice(verdict: PacingVerdict, changePct: number): string | null {
  const pct = Math.abs(Math.round(changePct));
  if (verdict === "rising") {
    return `The last third was ${pct} % stronger than the first. Finishing this much stronger than you started usually means the opening was held back, so this result most likely sits below your real threshold. Next time open close to the power you can finish at; until then treat the number as a floor, not a ceiling.`;
  }
  if (verdict === "fading") {
    return `The last third was ${pct} % weaker than the first. Going out too hard and then slowing usually costs more than it gains, so this result may sit a little below your real threshold. Next time open a few per cent easier and build into the effort.`;
  }
  return null;
}

/**
 * Heart-rate drift over a window, first half against second half. With power, the drift of the power-to-heart-rate
 * ratio ((P/HR)₁ ÷ (P/HR)₂ − 1, in %, the usual aerobic decoupling figure); without power, the rise of mean heart rate.
 */
export function heartRateDrift(
  series: Series,
  startS = 0,
  windowS = series.length - startS,
): { firstHr: number; secondHr: number; driftPct: number; basis: "power_to_hr" | "hr" } {
  if (!series.some((s) => typeof s.hr === "number"))
    throw new TrainingInputError("no_heart_rate", "This file has no heart-rate readings.");
  checkWindow(windowS, series.length - startS);
  if (windowS < 120)
    throw new TrainingInputError("too_short", "Heart-rate drift needs a window of at least 2 minutes.");
  const half = Math.floor(windowS / 2);
  const mean = (from: number, to: number, key: "hr" | "power") => {
    let sum = 0;
    let n = 0;
    for (let i = from; i < to; i++) {
      const v = series[i][key];
      if (typeof v === "number") {
        sum += v;
        n++;
      }
    }
    return n ? sum / n : 0;
  };
  const firstHr = mean(startS, startS + half, "hr");
  const secondHr = mean(startS + half, startS + 2 * half, "hr");
  if (!(firstHr > 0) || !(secondHr > 0))
    throw new TrainingInputError("no_heart_rate", "Heart rate is missing in part of the window.");
  const hasPower = series.some((s) => typeof s.power === "number" && s.power > 0);
  if (hasPower) {
    const p1 = mean(startS, startS + half, "power");
    const p2 = mean(startS + half, startS + 2 * half, "power");
    if (p1 > 0 && p2 > 0)
      return { firstHr, secondHr, driftPct: (p1 / firstHr / (p2 / secondHr) - 1) * 100, basis: "power_to_hr" };
  }
  return { firstHr, secondHr, driftPct: ((secondHr - firstHr) / firstHr) * 100, basis: "hr" };
}

/**
 * Minutes spent in each zone for a 1 Hz channel, given zone tops in absolute units (the last zone open). Same
 * convention as the intensity bands: a zone is [previous top, top), so a value exactly on a top counts in the zone above.
 */
export function minutesInZones(values: readonly (number | null | undefined)[], tops: readonly number[]): number[] {
  const out = new Array(tops.length + 1).fill(0);
  for (const v of values) {
    if (typeof v !== "number" || !(v > 0)) continue;
    let z = tops.findIndex((top) => v < top - 1e-9);
    if (z === -1) z = tops.length;
    out[z] += 1 / 60;
  }
  return out;
}

/**
 * Time within target for a planned session ridden from the file's start: each power step with an absolute range is
 * laid over the matching seconds, and a second counts when its power lies in the range widened by `tolerancePct`
 * of the range's middle (5 % by default, common practice). Ramps count against the straight line of their ends.
 */
export function timeInTarget(
  series: readonly Sample[],
  steps: readonly { durationS: number; low: number | null; high: number | null; ramp?: boolean }[],
  tolerancePct = 5,
): { targetedS: number; inTargetS: number } {
  const power = powerOf(series);
  let t = 0;
  let targetedS = 0;
  let inTargetS = 0;
  for (const step of steps) {
    const d = Math.max(0, Math.round(step.durationS));
    if (step.low !== null && step.high !== null) {
      for (let k = 0; k < d && t + k < power.length; k++) {
        const lo = step.ramp
          ? step.low + ((step.high - step.low) * k) / Math.max(1, d - 1)
          : Math.min(step.low, step.high);
        const hi = step.ramp ? lo : Math.max(step.low, step.high);
        const slack = (((lo + hi) / 2) * tolerancePct) / 100;
        targetedS++;
        if (power[t + k] >= lo - slack && power[t + k] <= hi + slack) inTargetS++;
      }
    }
    t += d;
  }
  return { targetedS, inTargetS };
}
