import { Op, type Transaction } from "sequelize";
import { Threshold } from "../models";
import type { Metric, TargetUnit } from "~/lib/training";

export type ThresholdSport = "bike" | "run" | "swim";

/** Which threshold family a session's sport uses; strength and other sessions have none. */
export function thresholdSport(sport: string): ThresholdSport | null {
  if (sport === "bike" || sport === "run" || sport === "swim") return sport;
  if (sport === "multi") return "bike";
  return null;
}

export function unitFor(sport: ThresholdSport, metric: Metric): TargetUnit {
  if (metric === "power") return "W";
  if (metric === "heart_rate") return "bpm";
  return sport === "swim" ? "s/100m" : "s/km";
}

export type ThresholdRow = Pick<Threshold, "id" | "sport" | "metric" | "value" | "effectiveFrom">;

export async function thresholdHistory(athleteId: number, transaction?: Transaction): Promise<ThresholdRow[]> {
  return Threshold.findAll({
    where: { athleteId },
    order: [
      ["effectiveFrom", "ASC"],
      ["id", "ASC"],
    ],
    attributes: ["id", "sport", "metric", "value", "effectiveFrom"],
    transaction,
  });
}

/** The threshold in force on `date`: the latest effective on or before it (ties: the later entry). */
export function thresholdOn(
  history: ThresholdRow[],
  sport: ThresholdSport,
  metric: Metric,
  date: string,
): ThresholdRow | null {
  let found: ThresholdRow | null = null;
  for (const t of history) if (t.sport === sport && t.metric === metric && t.effectiveFrom <= date) found = t;
  return found;
}

export async function currentThresholds(athleteId: number, today: string) {
  const rows = await Threshold.findAll({
    where: { athleteId, effectiveFrom: { [Op.lte]: today } },
    order: [
      ["effectiveFrom", "ASC"],
      ["id", "ASC"],
    ],
  });
  const latest = new Map<string, Threshold>();
  for (const r of rows) latest.set(`${r.sport}:${r.metric}`, r);
  return [...latest.values()];
}
