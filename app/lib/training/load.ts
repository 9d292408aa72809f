import { requireFinite, requirePositive, TrainingInputError } from "./errors";

/** A day's load checked as requireFinite checks it; the message is only built for a bad value (years of days add up). */
const dayLoad = (l: number, i: number) =>
  typeof l === "number" && Number.isFinite(l) && l >= 0 ? l : requireFinite(l, `Load on day ${i + 1}`, { min: 0 });

/** Session effort load = effort score (0–10) × minutes. Source: Foster C et al. (2001) J Strength Cond Res 15(1):109–115. */
export function effortLoad(effortScore: number, minutes: number): number {
  const score = requireFinite(effortScore, "Effort score", { min: 0, max: 10 });
  const mins = requireFinite(minutes, "Minutes", { min: 0, max: 24 * 60 });
  return score * mins;
}

/**
 * Banister's training impulse: minutes × x × k·e^(b·x), x = (HRavg − HRrest)/(HRmax − HRrest), with k = 0.64,
 * b = 1.92 for men and k = 0.86, b = 1.67 for women. Source: Banister EW (1991), in MacDougall, Wenger & Green (eds),
 * Physiological Testing of the High-Performance Athlete; constants as given by Morton, Fitz-Clarke & Banister (1990).
 */
export function trimpBanister(input: {
  minutes: number;
  avgHr: number;
  restHr: number;
  maxHr: number;
  sex: "male" | "female";
}): number {
  const minutes = requireFinite(input.minutes, "Minutes", { min: 0, max: 24 * 60 });
  const rest = requireFinite(input.restHr, "Resting heart rate", { min: 25, max: 120 });
  const max = requireFinite(input.maxHr, "Maximum heart rate", { min: 100, max: 250 });
  if (max <= rest) throw new TrainingInputError("inconsistent", "Maximum heart rate must be above resting heart rate.");
  const avg = requireFinite(input.avgHr, "Average heart rate", { min: 25, max: 250 });
  const x = Math.min(1, Math.max(0, (avg - rest) / (max - rest)));
  const [k, b] = input.sex === "female" ? [0.86, 1.67] : [0.64, 1.92];
  return minutes * x * k * Math.exp(b * x);
}

/**
 * Edwards' summated heart-rate zone score: minutes in zones 50–60, 60–70, 70–80, 80–90 and 90–100 % of maximum
 * heart rate weighted 1 to 5. Source: Edwards S (1993), The Heart Rate Monitor Book.
 */
export function trimpEdwards(minutesInZones: readonly number[]): number {
  if (!Array.isArray(minutesInZones) || minutesInZones.length !== 5) {
    throw new TrainingInputError("out_of_range", "Give minutes for each of the five heart-rate zones.");
  }
  return minutesInZones.reduce(
    (sum, m, i) => sum + requireFinite(m, `Minutes in zone ${i + 1}`, { min: 0 }) * (i + 1),
    0,
  );
}

/**
 * Lower edges of Edwards' five zones in % of maximum heart rate: 50, 60, 70, 80, 90. Time below 50 % is not
 * counted at all (Edwards 1993 scores only the five zones). Each zone is half-open, [lower, next lower): a reading
 * of exactly 60 % belongs to the 60–70 % zone. Readings above the maximum count in the top zone (the maximum was
 * set too low, not the effort off the scale).
 */
export const EDWARDS_ZONE_FLOORS_PCT = [50, 60, 70, 80, 90] as const;

/** Zone tops (bpm) of Edwards' first four zones for a maximum heart rate: 60, 70, 80, 90 % (the fifth is open). */
export function edwardsZoneTops(maxHr: number): number[] {
  const max = requirePositive(maxHr, "Maximum heart rate", 250);
  return [0.6, 0.7, 0.8, 0.9].map((f) => f * max);
}

/** Minutes in each of Edwards' five zones from 1 Hz heart rate; seconds below 50 % of maximum and gaps are left out. */
export function edwardsZoneMinutes(hr1Hz: readonly (number | null | undefined)[], maxHr: number): number[] {
  const max = requirePositive(maxHr, "Maximum heart rate", 250);
  const seconds = [0, 0, 0, 0, 0];
  for (const v of hr1Hz) {
    if (typeof v !== "number" || !Number.isFinite(v) || v <= 0) continue;
    // Compare in whole hundredths of a per cent, so 60 % of 190 bpm (114 bpm) is not lost to float rounding.
    const p = Math.round((v / max) * 10_000);
    if (p < EDWARDS_ZONE_FLOORS_PCT[0] * 100) continue;
    let z = EDWARDS_ZONE_FLOORS_PCT.length - 1;
    while (z > 0 && p < EDWARDS_ZONE_FLOORS_PCT[z] * 100) z--;
    seconds[z]++;
  }
  return seconds.map((n) => n / 60);
}

/** Edwards' zone score straight from 1 Hz heart rate: edwardsZoneMinutes weighted 1 to 5 (same source). */
export function trimpEdwardsFromHeartRate(hr1Hz: readonly (number | null | undefined)[], maxHr: number): number {
  return trimpEdwards(edwardsZoneMinutes(hr1Hz, maxHr));
}

/**
 * Monotony (mean daily load ÷ its standard deviation) and strain (weekly load × monotony) over a week.
 * Source: Foster C (1998) Med Sci Sports Exerc 30(7):1164–1168. Foster's spreadsheets use the population standard
 * deviation; `sd: "sample"` divides by n − 1 instead. With no variation at all, monotony has no value (null).
 */
export function monotonyStrain(dailyLoads: readonly number[], opts: { sd?: "population" | "sample" } = {}) {
  if (!Array.isArray(dailyLoads) || dailyLoads.length < 2)
    throw new TrainingInputError("too_short", "Monotony needs at least two days of loads.");
  const loads = dailyLoads.map((l, i) => dayLoad(l, i));
  const n = loads.length;
  const total = loads.reduce((s, l) => s + l, 0);
  const mean = total / n;
  const ss = loads.reduce((s, l) => s + (l - mean) ** 2, 0);
  const sd = Math.sqrt(ss / (opts.sd === "sample" ? n - 1 : n));
  const monotony = sd > 0 ? mean / sd : null;
  return { weeklyLoad: total, mean, sd, monotony, strain: monotony === null ? null : total * monotony };
}

/**
 * Fitness (long trend) and fatigue (short trend) as exponentially weighted daily loads:
 * F_t = F_(t−1) + (w_t − F_(t−1)) · (1 − e^(−1/τ)), with τ = 42 and 7 days; balance = fitness − fatigue on the same day.
 * Source: Banister EW, Calvert TW, Savage MV, Bach T (1975) Aust J Sports Med 7:57–61 (impulse–response model).
 */
export function fitnessFatigue(
  dailyLoads: readonly number[],
  opts: { tauFitness?: number; tauFatigue?: number; startFitness?: number; startFatigue?: number } = {},
): { fitness: number; fatigue: number; balance: number }[] {
  const tauF = requirePositive(opts.tauFitness ?? 42, "Fitness time constant (days)", 400);
  const tauA = requirePositive(opts.tauFatigue ?? 7, "Fatigue time constant (days)", 400);
  const kF = 1 - Math.exp(-1 / tauF);
  const kA = 1 - Math.exp(-1 / tauA);
  let fitness = requireFinite(opts.startFitness ?? 0, "Starting fitness", { min: 0 });
  let fatigue = requireFinite(opts.startFatigue ?? 0, "Starting fatigue", { min: 0 });
  return dailyLoads.map((w, i) => {
    const load = dayLoad(w, i);
    fitness += (load - fitness) * kF;
    fatigue += (load - fatigue) * kA;
    return { fitness, fatigue, balance: fitness - fatigue };
  });
}

/**
 * Acute:chronic load ratio per day. "rolling": mean of the last 7 days ÷ mean of the last 28 (Gabbett TJ (2016)
 * Br J Sports Med 50:273–280). "ewma": exponentially weighted averages EWMA_t = λ·load_t + (1 − λ)·EWMA_(t−1) with
 * λ = 2/(N + 1), N = 7 and 28 (Williams S et al. (2017) Br J Sports Med 51:209–210).
 *
 * Both are null ("not enough history") until the chronic window is full of real history: history starts at
 * `historyStart` (an index into the loads) or, by default, at the first day with any load, because days before an
 * athlete's first record are unknown, not rest. Without this, a week of training after empty days divides a fresh
 * acute average by a chronic average still mostly made of zeros and reports a spike that never happened.
 */
export function acuteChronicRatio(
  dailyLoads: readonly number[],
  opts: { method?: "rolling" | "ewma"; acuteDays?: number; chronicDays?: number; historyStart?: number } = {},
): (number | null)[] {
  const acuteN = opts.acuteDays ?? 7;
  const chronicN = opts.chronicDays ?? 28;
  if (!(acuteN >= 1 && chronicN > acuteN))
    throw new TrainingInputError("out_of_range", "The chronic window must be longer than the acute window.");
  const loads = dailyLoads.map((l, i) => dayLoad(l, i));
  const first = opts.historyStart ?? loads.findIndex((l) => l > 0);
  const enough = (i: number) => first !== -1 && i >= first && i - first + 1 >= chronicN;
  if (opts.method === "ewma") {
    const la = 2 / (acuteN + 1);
    const lc = 2 / (chronicN + 1);
    // Both averages start from the mean load of the first 28 days of history, not from an empty past (a start value
    // is not given by Williams et al.; this choice is common practice). No ratio is shown before day 28 anyway.
    const seedDays = loads.slice(Math.max(0, first), Math.max(0, first) + chronicN);
    const seed = seedDays.length ? seedDays.reduce((a, b) => a + b, 0) / seedDays.length : 0;
    let acute = seed;
    let chronic = seed;
    return loads.map((l, i) => {
      if (first === -1 || i < first) return null;
      acute = la * l + (1 - la) * acute;
      chronic = lc * l + (1 - lc) * chronic;
      return enough(i) && chronic > 0 ? acute / chronic : null;
    });
  }
  const prefix = [0];
  for (const l of loads) prefix.push(prefix[prefix.length - 1] + l);
  return loads.map((_, i) => {
    if (!enough(i)) return null;
    const acute = (prefix[i + 1] - prefix[i + 1 - acuteN]) / acuteN;
    const chronic = (prefix[i + 1] - prefix[i + 1 - chronicN]) / chronicN;
    return chronic > 0 ? acute / chronic : null;
  });
}

/**
 * The usual range of a week's load from the chronic load before it: 28-day mean daily load × 7 × [0.8, 1.3], the
 * ratio range Gabbett (2016) reports as lowest-risk. Null with fewer than 28 days of history before the week.
 */
export function usualWeekRange(
  dailyLoads: readonly number[],
  weekStart: number,
  opts: { historyStart?: number; low?: number; high?: number } = {},
): { low: number; high: number; chronic: number } | null {
  const first = opts.historyStart ?? dailyLoads.findIndex((l) => l > 0);
  if (first === -1 || weekStart - first < 28 || weekStart > dailyLoads.length) return null;
  let sum = 0;
  for (let i = weekStart - 28; i < weekStart; i++) sum += dayLoad(dailyLoads[i], i);
  const chronic = (sum / 28) * 7;
  return { low: chronic * (opts.low ?? 0.8), high: chronic * (opts.high ?? 1.3), chronic };
}

export type RatioBand = "low" | "usual" | "raised" | "spike";

/**
 * Guidance bands for the acute:chronic ratio, after Gabbett (2016): below 0.8 low, 0.8–1.3 usual, 1.3–1.5 raised,
 * above 1.5 a spike. Guidance only: the ratio's link to injury is debated, and it is no diagnosis.
 */
export function ratioBand(ratio: number): RatioBand {
  if (ratio < 0.8) return "low";
  if (ratio <= 1.3) return "usual";
  if (ratio <= 1.5) return "raised";
  return "spike";
}
