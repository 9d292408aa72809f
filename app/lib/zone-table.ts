import { formatTarget, heartRateZones, paceZones, powerLevels, type TargetUnit } from "~/lib/training";

/** A threshold the way athletes read it: "262 W", "168 bpm", "4:07 /km". */
export function formatThreshold(value: number, unit: string) {
  const v = Math.round(value);
  return formatTarget({ low: v, high: v, unit: unit as TargetUnit });
}

export interface ZoneTableData {
  key: string;
  metric: string;
  unit: string;
  threshold: number;
  source: string;
  rows: { key: string; name: string; lo: number; hi: number | null }[];
}

/** The zones of one threshold for display; swim pace has no zone table of ours yet (null). */
export function zoneTable(t: { sport: string; metric: string; value: number; unit: string }): ZoneTableData | null {
  if (t.metric === "pace" && t.sport === "swim") return null;
  const set = t.metric === "power" ? powerLevels(t.value) : t.metric === "heart_rate" ? heartRateZones(t.value, t.sport === "run" ? "run" : "bike") : paceZones(t.value);
  return { key: `${t.sport}:${t.metric}`, metric: t.metric, unit: t.unit, threshold: t.value, source: set.source, rows: set.zones.map((z) => ({ key: z.key, name: z.name, lo: z.lo, hi: z.hi })) };
}
