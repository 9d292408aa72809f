import type { Sample } from "./activity";
import { requirePositive, TrainingInputError } from "./errors";

type Series = readonly Sample[];

/** Power at 1 Hz, with missing readings as 0; throws when the file has no power at all. */
export function powerOf(series: Series): Float64Array {
  if (!series.length) throw new TrainingInputError("empty_file", "The activity has no samples.");
  if (!series.some((s) => typeof s.power === "number")) {
    throw new TrainingInputError("no_power", "This file has no power readings; a power test needs a power meter's data.");
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
  if (!Number.isInteger(windowS)) throw new TrainingInputError("out_of_range", "The window must be a whole number of seconds.");
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

export const STANDARD_WINDOWS_S = [1, 5, 10, 15, 20, 30, 45, 60, 90, 120, 180, 240, 300, 360, 480, 600, 720, 900, 1200, 1800, 2400, 3600] as const;

/** Mean-maximal power for each window that fits in the activity (windows longer than it are left out). */
export function powerCurve(series: Series, windowsS: readonly number[] = STANDARD_WINDOWS_S): { windowS: number; watts: number }[] {
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
  stepW: number;
  stepS: number;
  steps: number;
  startS: number;
  endS: number;
  bestOneMinuteW: number;
}

/**
 * Finds a ramp test: equal power steps of equal length, rising to exhaustion. The test ends where the best
 * one-minute power ends; step lengths of 30 s to 3 min are tried, and the one whose steps are flattest inside and
 * rise most regularly wins. At least five rising steps are needed.
 */
export function detectRampTest(series: Series): RampDetection {
  const power = powerOf(series);
  if (power.length < 300) throw new TrainingInputError("too_short", "A ramp test needs at least 5 minutes of data.");
  const prefix = prefixSums(power);
  const best = bestFromPrefix(prefix, 60);
  const endS = best.startS + 60;
  let winner: { score: number; stepS: number; means: number[] } | null = null;
  for (const stepS of [30, 60, 90, 120, 150, 180]) {
    const means: number[] = [];
    let varianceSum = 0;
    for (let end = endS; end - stepS >= 0; end -= stepS) {
      const start = end - stepS;
      const mean = (prefix[end] - prefix[start]) / stepS;
      let v = 0;
      for (let i = start; i < end; i++) v += (power[i] - mean) ** 2;
      varianceSum += v / stepS;
      means.unshift(mean);
    }
    // Keep the run of rising steps that leads into the end of the test.
    let k = means.length - 1;
    while (k > 0 && means[k] - means[k - 1] > 0) k--;
    const rising = means.slice(k);
    if (rising.length < 6) continue;
    const diffs = rising.slice(1).map((m, i) => m - rising[i]);
    const med = median(diffs);
    const spread = diffs.reduce((s, d) => s + Math.abs(d - med), 0) / diffs.length;
    const withinSd = Math.sqrt(varianceSum / means.length);
    const score = (spread + withinSd) / Math.max(med, 1);
    if (!winner || score < winner.score) winner = { score, stepS, means: rising };
  }
  if (!winner) throw new TrainingInputError("not_a_ramp", "No ramp of at least five rising steps was found before the best minute.");
  const diffs = winner.means.slice(1).map((m, i) => m - winner!.means[i]);
  const steps = winner.means.length;
  return {
    stepW: median(diffs.slice(0, -1).length ? diffs.slice(0, -1) : diffs),
    stepS: winner.stepS,
    steps,
    startS: endS - steps * winner.stepS,
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
export function pacingSplits(series: Series, startS: number, windowS: number, parts = 3): { means: number[]; changePct: number; verdict: PacingVerdict } {
  const power = powerOf(series);
  if (!Number.isInteger(startS) || startS < 0) throw new TrainingInputError("out_of_range", "The window start must be a whole second from 0.");
  checkWindow(windowS, power.length - startS);
  if (!Number.isInteger(parts) || parts < 2 || parts > windowS) throw new TrainingInputError("out_of_range", "Split the window into 2 or more parts.");
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
 * Heart-rate drift over a window, first half against second half. With power, the drift of the power-to-heart-rate
 * ratio ((P/HR)₁ ÷ (P/HR)₂ − 1, in %, the usual aerobic decoupling figure); without power, the rise of mean heart rate.
 */
export function heartRateDrift(series: Series, startS = 0, windowS = series.length - startS): { firstHr: number; secondHr: number; driftPct: number; basis: "power_to_hr" | "hr" } {
  if (!series.some((s) => typeof s.hr === "number")) throw new TrainingInputError("no_heart_rate", "This file has no heart-rate readings.");
  checkWindow(windowS, series.length - startS);
  if (windowS < 120) throw new TrainingInputError("too_short", "Heart-rate drift needs a window of at least 2 minutes.");
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
  if (!(firstHr > 0) || !(secondHr > 0)) throw new TrainingInputError("no_heart_rate", "Heart rate is missing in part of the window.");
  const hasPower = series.some((s) => typeof s.power === "number" && s.power > 0);
  if (hasPower) {
    const p1 = mean(startS, startS + half, "power");
    const p2 = mean(startS + half, startS + 2 * half, "power");
    if (p1 > 0 && p2 > 0) return { firstHr, secondHr, driftPct: ((p1 / firstHr) / (p2 / secondHr) - 1) * 100, basis: "power_to_hr" };
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
        const lo = step.ramp ? step.low + ((step.high - step.low) * k) / Math.max(1, d - 1) : Math.min(step.low, step.high);
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
