import { Op } from "sequelize";
import { Assignment, PlanItem, ScheduledSession, SeasonPlan, Threshold } from "../models";
import { thresholdSport } from "./thresholds";
import type { PlanSpan } from "~/lib/placement";
import { expandBlocks, type Block } from "~/lib/training";

/**
 * What placing a plan on an athlete's calendar would run into, for the shop's pre-purchase check (and any other
 * page that places plans): the plans already on the calendar with dates still to come, and which of the plan's
 * sports the athlete has no threshold for (their sessions will say "needs a field test").
 */
export async function placementContext(athleteId: number, planId: number, today: string) {
  const rows = await ScheduledSession.findAll({
    where: { athleteId, status: "planned", date: { [Op.gte]: today }, assignmentId: { [Op.ne]: null } },
    attributes: ["assignmentId", "date"],
  });
  const spans = new Map<number, { from: string; to: string }>();
  for (const r of rows) {
    const s = spans.get(r.assignmentId!);
    if (!s) spans.set(r.assignmentId!, { from: r.date, to: r.date });
    else {
      if (r.date < s.from) s.from = r.date;
      if (r.date > s.to) s.to = r.date;
    }
  }
  const assignments = spans.size ? await Assignment.findAll({ where: { id: [...spans.keys()] } }) : [];
  const plans = new Map(
    (
      await SeasonPlan.findAll({
        where: { id: [...new Set(assignments.map((a) => a.planId).filter((id): id is number => id !== null))] },
      })
    ).map((p) => [p.id, p.name]),
  );
  const current: PlanSpan[] = assignments
    .map((a) => ({ name: (a.planId && plans.get(a.planId)) || "a plan on your calendar", ...spans.get(a.id)! }))
    .sort((a, b) => a.from.localeCompare(b.from));

  const items = await PlanItem.findAll({ where: { planId }, attributes: ["sport", "blocks"] });
  const have = new Set((await Threshold.findAll({ where: { athleteId }, attributes: ["sport"] })).map((t) => t.sport));
  const missing = new Map<string, number>();
  for (const item of items) {
    const tsport = thresholdSport(item.sport);
    if (!tsport || have.has(tsport)) continue;
    const targeted = expandBlocks(item.blocks as Block[]).some((s) => s.metric !== null);
    if (targeted) missing.set(tsport, (missing.get(tsport) ?? 0) + 1);
  }
  return { current, missingThresholds: [...missing.entries()].map(([sport, sessions]) => ({ sport, sessions })) };
}
