import { requireFinite, requirePositive, TrainingInputError } from "./errors";

/** Power a rider holds for 20 minutes and more; upper bound keeps typos (2500 for 250) out. */
const MAX_WATTS = 2500;

/**
 * Threshold power from the mean power of a 20-minute all-out effort: 95 % of it.
 * Source: common practice (the trade's rule of thumb; no single published derivation).
 */
export function thresholdFromTwentyMinute(meanW: number): number {
  return requirePositive(meanW, "The 20-minute mean power", MAX_WATTS) * 0.95;
}

/**
 * Threshold power from the mean power of an 8-minute all-out effort: 90 % of it.
 * Source: Klika RJ, Alderdice MS, Kvale JJ, Kearney JT (2007), J Strength Cond Res 21(1):265–269.
 */
export function thresholdFromEightMinute(meanW: number): number {
  return requirePositive(meanW, "The 8-minute mean power", MAX_WATTS) * 0.9;
}

/**
 * Threshold power from a ramp test: 75 % of the best one-minute power.
 * Source: common practice (no single published derivation).
 */
export function thresholdFromRamp(bestOneMinuteW: number): number {
  return requirePositive(bestOneMinuteW, "The best one-minute power", MAX_WATTS) * 0.75;
}

/**
 * The ramp rates the 0.75 rule is used with: steps adding 20 to 25 W a minute (common practice; the rule has no
 * single published derivation). Peak power in a ramp depends on how fast it rises, so outside this range the
 * factor does not transfer and the result needs a confirming test. Rates are compared after rounding to 1 W/min.
 */
export const USUAL_RAMP_RATE_W_PER_MIN = { low: 20, high: 25 } as const;

export interface RampRateCheck {
  rateWPerMin: number;
  withinUsual: boolean;
  /** Why the 0.75 rule does not hold for this ramp, with the confirming test to ride; null within the usual rate. */
  caution: string | null;
}

export function checkRampRate(rateWPerMin: number): RampRateCheck {
  const rate = requirePositive(rateWPerMin, "The ramp rate (W per minute)", 100);
  const rounded = Math.round(rate);
  const { low, high } = USUAL_RAMP_RATE_W_PER_MIN;
  const withinUsual = rounded >= low && rounded <= high;
  const speed = rounded < low ? "slower" : "faster";
  return {
    rateWPerMin: rate,
    withinUsual,
    caution: withinUsual
      ? null
      : `This ramp rose ${rounded} W a minute. The 75 % rule is used with ramps of ${low}–${high} W a minute; on a ${speed} ramp the best minute comes out ${rounded < low ? "lower" : "higher"} for the same rider, so 75 % of it does not give the threshold reliably. Treat this number as provisional and confirm it with a 20-minute or 8-minute test within the next two weeks.`,
  };
}

export interface MaximalEffort {
  durationS: number;
  meanPowerW: number;
}

export interface CriticalPowerResult {
  cpW: number;
  wPrimeJ: number;
  /** Coefficient of determination of the work–time fit (1 for two efforts). */
  r2: number;
  warnings: string[];
  /** The fit itself, for showing: each effort's work beside the line's work at its duration. */
  points: { durationS: number; meanPowerW: number; workJ: number; fittedWorkJ: number }[];
}

/** Below this r² the work–time line is a poor description of the efforts (our acceptance rule, common practice: no single published cut-off). */
export const CP_MIN_R2 = 0.95;
/** Effort durations where the two-parameter model holds best: about 2 to 20 minutes (Jones et al. 2010). */
export const CP_DURATION_RANGE_S = { min: 120, max: 1200 } as const;

const clock = (s: number) => {
  const r = Math.round(s);
  return `${Math.floor(r / 60)}:${String(r % 60).padStart(2, "0")}`;
};

/**
 * Critical power and W′ from two or more maximal efforts, by least-squares regression of work (P·t) on time:
 * work = CP · t + W′ (the linear work–time model).
 * Sources: Monod H, Scherrer J (1965) Ergonomics 8:329–338; Jones AM, Vanhatalo A, Burnley M, Morton RH,
 * Poole DC (2010) Med Sci Sports Exerc 42(10):1876–1890 (efforts of about 2 to 15–20 minutes).
 * All-out efforts must lose power as they get longer; a pair where the longer one is as strong or stronger is
 * refused by name, because no line through it means anything. r² below 0.95 and efforts outside 2–20 minutes
 * are warned about.
 */
export function criticalPower(efforts: readonly MaximalEffort[]): CriticalPowerResult {
  if (!Array.isArray(efforts) || efforts.length < 2) {
    throw new TrainingInputError(
      "too_few_efforts",
      "Critical power needs at least two maximal efforts of different lengths.",
    );
  }
  const points = efforts.map((e, i) => {
    const t = requirePositive(e.durationS, `Effort ${i + 1}'s duration (s)`, 4 * 3600);
    const p = requirePositive(e.meanPowerW, `Effort ${i + 1}'s mean power (W)`, MAX_WATTS);
    return { t, p, w: p * t };
  });
  const sorted = [...points].sort((a, b) => a.t - b.t);
  for (let i = 1; i < sorted.length; i++) {
    const short = sorted[i - 1];
    const long = sorted[i];
    if (long.t === short.t) throw new TrainingInputError("inconsistent", "The efforts must have different durations.");
    if (long.p >= short.p) {
      throw new TrainingInputError(
        "inconsistent",
        `The ${clock(long.t)} effort (${Math.round(long.p)} W) is not below the ${clock(short.t)} effort (${Math.round(short.p)} W). ` +
          "A longer all-out effort always has a lower mean power, so one of these was not all-out or is mistyped; check them or ride that effort again.",
      );
    }
  }
  const n = points.length;
  const meanT = points.reduce((s, p) => s + p.t, 0) / n;
  const meanW = points.reduce((s, p) => s + p.w, 0) / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (const p of points) {
    sxx += (p.t - meanT) ** 2;
    sxy += (p.t - meanT) * (p.w - meanW);
    syy += (p.w - meanW) ** 2;
  }
  const cpW = sxy / sxx;
  const wPrimeJ = meanW - cpW * meanT;
  if (!(cpW > 0) || !(wPrimeJ > 0)) {
    throw new TrainingInputError(
      "inconsistent",
      "These efforts do not fit the critical-power model: a longer effort must have a lower mean power, and each should be all-out.",
    );
  }
  const r2 = syy === 0 ? 1 : (sxy * sxy) / (sxx * syy);
  const warnings = sorted
    .filter((p) => p.t < CP_DURATION_RANGE_S.min || p.t > CP_DURATION_RANGE_S.max)
    .map((p) => `The ${clock(p.t)} effort lies outside 2–20 minutes, where the model holds best (Jones et al. 2010).`);
  if (r2 < CP_MIN_R2) {
    warnings.push(
      `The efforts fit the work–time line loosely (r² ${r2.toFixed(3)}, below ${CP_MIN_R2}): at least one was probably not all-out. Ride it again before trusting this critical power.`,
    );
  }
  return {
    cpW,
    wPrimeJ,
    r2,
    warnings,
    points: sorted.map((p) => ({ durationS: p.t, meanPowerW: p.p, workJ: p.w, fittedWorkJ: cpW * p.t + wPrimeJ })),
  };
}

/**
 * Time to exhaustion at a power above critical power: t = W′ / (P − CP) (same model and sources as above).
 * Returns null at or below CP, where the model sets no limit.
 */
export function timeToExhaustion(powerW: number, model: { cpW: number; wPrimeJ: number }): number | null {
  const p = requirePositive(powerW, "Power (W)", MAX_WATTS);
  const cp = requirePositive(model.cpW, "Critical power (W)", MAX_WATTS);
  const wp = requirePositive(model.wPrimeJ, "W′ (J)", 200_000);
  return p <= cp ? null : wp / (p - cp);
}

/**
 * Threshold heart rate from a solo 30-minute all-out test recorded at 1 Hz: the mean of the last 20 minutes.
 * Source: Friel J, The Cyclist's Training Bible / The Triathlete's Training Bible (30-minute test protocol).
 * Missing samples (null) are skipped; at least 90 % of the last 20 minutes must be present.
 */
export function thresholdHeartRate(hr1Hz: readonly (number | null | undefined)[]): number {
  if (!Array.isArray(hr1Hz) || hr1Hz.length < 1800) {
    throw new TrainingInputError("too_short", "The heart-rate test must last at least 30 minutes.");
  }
  const last = hr1Hz.slice(hr1Hz.length - 1200);
  const valid = last.filter((v): v is number => typeof v === "number" && Number.isFinite(v) && v > 0);
  if (valid.length < 0.9 * 1200) {
    throw new TrainingInputError("no_heart_rate", "Heart rate is missing for more than 10 % of the last 20 minutes.");
  }
  const mean = valid.reduce((s, v) => s + v, 0) / valid.length;
  return requireFinite(mean, "Mean heart rate", { min: 60, max: 230 });
}

export interface SwimThreshold {
  speedMps: number;
  pacePer100mS: number;
  /** Distance intercept of the distance–time line (m): the swim's anaerobic reserve. */
  dPrimeM: number;
}

/**
 * Critical swim speed from a 400 m and a 200 m all-out swim: (400 − 200) / (t400 − t200).
 * Sources: Wakayoshi K et al. (1992) Int J Sports Med 13(5):367–371; Ginn E (1993), Australian Sports Commission.
 */
export function criticalSwimSpeed(t400S: number, t200S: number): SwimThreshold {
  const t400 = requirePositive(t400S, "The 400 m time (s)", 3600);
  const t200 = requirePositive(t200S, "The 200 m time (s)", 1800);
  if (t400 <= t200) throw new TrainingInputError("inconsistent", "The 400 m must take longer than the 200 m.");
  if (t400 < 2 * t200 * 0.9 || t400 > 2 * t200 * 1.5) {
    // A 400 m faster than about twice the 200 m, or far slower, is almost always a typing slip.
    throw new TrainingInputError(
      "inconsistent",
      "These times do not look like one swimmer's all-out 400 m and 200 m; check them.",
    );
  }
  const speedMps = 200 / (t400 - t200);
  return { speedMps, pacePer100mS: 100 / speedMps, dPrimeM: 400 - speedMps * t400 };
}
