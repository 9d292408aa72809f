import { requirePositive, TrainingInputError } from "./errors";

export type Metric = "power" | "heart_rate" | "pace";

/**
 * A zone covers the half-open interval (loPct, hiPct] of intensity, in percent of threshold. For pace, intensity
 * is percent of threshold *speed*, so a faster pace is a higher percentage. The first zone starts above 0 and the
 * last is open-ended (hiPct null). Every intensity above 0 therefore falls in exactly one zone, and a value that
 * sits exactly on a boundary belongs to the lower zone: "up to and including 55 %" is level 1.
 */
export interface Zone {
  index: number;
  key: string;
  name: string;
  loPct: number;
  hiPct: number | null;
  /** Absolute bounds in the metric's unit (W, bpm, or s per km — for pace `lo` is the slower end). */
  lo: number;
  hi: number | null;
}

export interface ZoneSet {
  metric: Metric;
  threshold: number;
  unit: "W" | "bpm" | "s/km";
  source: string;
  zones: Zone[];
}

function build(
  metric: Metric,
  threshold: number,
  unit: ZoneSet["unit"],
  source: string,
  tops: readonly (readonly [key: string, name: string, hiPct: number | null])[],
): ZoneSet {
  let lo = 0;
  const zones = tops.map(([key, name, hiPct], i) => {
    const zone: Zone = {
      index: i + 1,
      key,
      name,
      loPct: lo,
      hiPct,
      lo: absolute(metric, lo, threshold),
      hi: hiPct === null ? null : absolute(metric, hiPct, threshold),
    };
    lo = hiPct ?? lo;
    return zone;
  });
  return { metric, threshold, unit, source, zones };
}

/** Absolute value for a percentage; for pace, the pace (s/km) at that percent of threshold speed. 0 % pace is no pace. */
function absolute(metric: Metric, pct: number, threshold: number): number {
  if (metric === "pace") return pct === 0 ? Number.MAX_SAFE_INTEGER : threshold / (pct / 100);
  return (pct / 100) * threshold;
}

/**
 * Seven power levels as % of threshold power: ≤55, 56–75, 76–90, 91–105, 106–120, 121–150, >150.
 * Source: common practice (the trade's widely used seven-level table). Names are ours.
 */
export function powerLevels(thresholdW: number): ZoneSet {
  const t = requirePositive(thresholdW, "Threshold power (W)", 2500);
  return build("power", t, "W", "Seven-level power table (common practice)", [
    ["L1", "Recovery", 55],
    ["L2", "Endurance", 75],
    ["L3", "Tempo", 90],
    ["L4", "Threshold", 105],
    ["L5", "Aerobic capacity", 120],
    ["L6", "Anaerobic", 150],
    ["L7", "Sprint", null],
  ]);
}

/**
 * Heart-rate zones as % of threshold heart rate, after Friel (The Cyclist's Training Bible for "bike", The
 * Triathlete's Training Bible for "run"). Friel lists whole percentages (e.g. zone 2 = 81–89 % on the bike); as
 * half-open intervals each zone runs from above the previous zone's top to its own top.
 * The percentages are as widely reproduced from those books (from memory; not re-checked against a copy).
 */
export function heartRateZones(lthr: number, sport: "bike" | "run"): ZoneSet {
  const t = requirePositive(lthr, "Threshold heart rate (bpm)", 230);
  if (t < 80) throw new TrainingInputError("out_of_range", "Threshold heart rate must be at least 80 bpm.");
  const bike = [80, 89, 93, 99, 102, 106] as const;
  const run = [84, 89, 94, 99, 102, 106] as const;
  const tops = sport === "run" ? run : bike;
  return build("heart_rate", t, "bpm", `Heart-rate zones for ${sport === "run" ? "running" : "cycling"} (Friel)`, [
    ["Z1", "Recovery", tops[0]],
    ["Z2", "Aerobic", tops[1]],
    ["Z3", "Tempo", tops[2]],
    ["Z4", "Sub-threshold", tops[3]],
    ["Z5a", "Threshold", tops[4]],
    ["Z5b", "Aerobic capacity", tops[5]],
    ["Z5c", "Anaerobic", null],
  ]);
}

/**
 * Run pace zones as % of threshold speed: ≤78, 79–88, 89–95, 96–102, 103–110, >110.
 * Source: common practice (no single published table); `threshold` is threshold pace in s per km.
 */
export function paceZones(thresholdPaceSPerKm: number): ZoneSet {
  const t = requirePositive(thresholdPaceSPerKm, "Threshold pace (s per km)", 1200);
  if (t < 120) throw new TrainingInputError("out_of_range", "Threshold pace must be slower than 2:00 per km.");
  return build("pace", t, "s/km", "Pace zones in percent of threshold speed (common practice)", [
    ["P1", "Easy", 78],
    ["P2", "Steady", 88],
    ["P3", "Tempo", 95],
    ["P4", "Threshold", 102],
    ["P5", "Interval", 110],
    ["P6", "Fast", null],
  ]);
}

/** Percent of threshold for an absolute value: for pace (s/km), percent of threshold speed. */
export function intensityPct(metric: Metric, value: number, threshold: number): number {
  const v = requirePositive(value, "Value");
  const t = requirePositive(threshold, "Threshold");
  return metric === "pace" ? (t / v) * 100 : (v / t) * 100;
}

/** The zone an absolute value falls in (W, bpm, or s per km for pace). */
export function zoneOf(value: number, set: ZoneSet): Zone {
  return zoneOfPct(intensityPct(set.metric, value, set.threshold), set);
}

/** The zone for an intensity given directly in percent of threshold. */
export function zoneOfPct(pct: number, set: ZoneSet): Zone {
  if (!Number.isFinite(pct) || pct <= 0) throw new TrainingInputError("out_of_range", "Intensity must be above 0 %.");
  // Compared with a small tolerance: 55 % of 250 W computed in floating point must still be level 1.
  const eps = 1e-9;
  const found = set.zones.find((z) => (z.index === 1 || pct > z.loPct + eps) && (z.hiPct === null || pct <= z.hiPct + eps));
  return found ?? set.zones[set.zones.length - 1];
}
