import { requireFinite, requirePositive } from "./errors";
import type { Metric } from "./bands";

export interface PercentTarget {
  metric: Metric;
  lowPct: number;
  /** Omit for a single value. */
  highPct?: number | null;
}

export type TargetUnit = "W" | "bpm" | "s/km" | "s/100m";

export interface AbsoluteTarget {
  /** For power and heart rate the lower number; for pace the slower pace (more seconds). */
  low: number;
  high: number;
  unit: TargetUnit;
}

export const MAX_TARGET_PCT = 300;

/**
 * Turns a %-of-threshold target into the athlete's own numbers: absolute = pct × threshold / 100 for power and
 * heart rate; for pace the percentage is of *speed*, so 110 % of threshold pace 4:00/km is 240 / 1.1 = 3:38/km.
 * Watts and bpm round to 1, pace to 1 s. `paceUnit` says whether the pace threshold is per km or per 100 m (swim).
 */
export function resolveTarget(
  target: PercentTarget,
  threshold: number,
  opts: { paceUnit?: "s/km" | "s/100m" } = {},
): AbsoluteTarget {
  const lowPct = requireFinite(target.lowPct, "Target (% of threshold)", {
    min: 0,
    exclusiveMin: true,
    max: MAX_TARGET_PCT,
  });
  const highPct =
    target.highPct == null
      ? lowPct
      : requireFinite(target.highPct, "Target high end (% of threshold)", { min: lowPct, max: MAX_TARGET_PCT });
  const t = requirePositive(threshold, "Threshold");
  if (target.metric === "pace") {
    return {
      low: Math.round(t / (lowPct / 100)),
      high: Math.round(t / (highPct / 100)),
      unit: opts.paceUnit ?? "s/km",
    };
  }
  // pct × threshold / 100 in this order, the same arithmetic the set-based rescale does in SQL.
  return {
    low: Math.round((lowPct * t) / 100),
    high: Math.round((highPct * t) / 100),
    unit: target.metric === "power" ? "W" : "bpm",
  };
}

/** The inverse of resolveTarget for one value: which percent of threshold an absolute number is. */
export function percentOfThreshold(metric: Metric, absolute: number, threshold: number): number {
  const a = requirePositive(absolute, "Value");
  const t = requirePositive(threshold, "Threshold");
  return metric === "pace" ? (t / a) * 100 : (a / t) * 100;
}

/** "4:05" for 245 s; "1:02:03" past an hour. */
export function formatDuration(totalS: number): string {
  const s = Math.round(totalS);
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const sec = s % 60;
  return h > 0
    ? `${h}:${String(m).padStart(2, "0")}:${String(sec).padStart(2, "0")}`
    : `${m}:${String(sec).padStart(2, "0")}`;
}

/** Writes an absolute target the way athletes read it: "237–247 W", "152 bpm", "4:05–4:12 /km". */
export function formatTarget(t: AbsoluteTarget): string {
  if (t.unit === "s/km" || t.unit === "s/100m") {
    const per = t.unit === "s/km" ? "/km" : "/100 m";
    const [fast, slow] = [Math.min(t.low, t.high), Math.max(t.low, t.high)];
    return fast === slow ? `${formatDuration(fast)} ${per}` : `${formatDuration(fast)}–${formatDuration(slow)} ${per}`;
  }
  return t.low === t.high ? `${t.low} ${t.unit}` : `${t.low}–${t.high} ${t.unit}`;
}
