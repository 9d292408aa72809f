import { Op, type Transaction } from "sequelize";
import { Assignment, PlanItem, ScheduledSession, SeasonPlan, Threshold } from "../models";
import { thresholdSport } from "./thresholds";
import { DomainError } from "../errors";
import type { PlanSpan } from "~/lib/placement";
import { expandBlocks, type Block } from "~/lib/training";

/**
 * Placing a plan on an athlete's calendar, whoever places it (a coach assigning, a paid order, the shop's check
 * before a purchase). `checkPlacement` asks what the placement runs into: does the athlete have thresholds for the
 * plan's sports, does it overlap sessions already planned, and would any day end up with two maximal tests. The
 * caller shows the report and asks for a choice; `applyPlacementChoice` then carries the choice out in the caller's
 * transaction. `placementContext` is the buyer's view of the same questions before there are dates.
 */
export interface PlacementEntry {
  date: string;
  name: string;
  sport: string;
  testProtocol: string | null;
}
export interface PlacementReport {
  athleteId: number;
  /** Sports of the plan for which the athlete has no threshold: those sessions would show only percentages. */
  sportsWithoutThreshold: string[];
  /** Planned sessions already on the calendar between the new plan's first and last day. */
  overlap: { from: string; to: string; sessions: number; plans: string[] } | null;
  /** Days with two or more maximal tests if the plan is placed alongside (after a replace, only days before it). */
  testDays: { date: string; names: string[] }[];
}
export type PlacementChoice = {
  overlap?: "replace" | "alongside";
  replaceFrom?: string;
  confirmSports?: boolean;
  confirmTests?: boolean;
};

export const needsChoice = (r: PlacementReport) =>
  r.sportsWithoutThreshold.length > 0 || r.overlap !== null || r.testDays.length > 0;

/** The sports the athlete has a threshold for. */
async function sportsWithThreshold(athleteId: number, transaction?: Transaction) {
  return new Set(
    (await Threshold.findAll({ where: { athleteId }, attributes: ["sport"], transaction })).map((t) => t.sport),
  );
}

/** The plan behind each assignment; an assignment whose plan was deleted has none. */
async function plansOf(assignmentIds: number[], transaction?: Transaction) {
  const out = new Map<number, { planId: number; name: string } | null>();
  if (!assignmentIds.length) return out;
  const assignments = await Assignment.findAll({ where: { id: assignmentIds }, transaction });
  const planIds = [...new Set(assignments.map((a) => a.planId).filter((id): id is number => id !== null))];
  const names = new Map(
    planIds.length
      ? (await SeasonPlan.findAll({ where: { id: planIds }, attributes: ["id", "name"], transaction })).map((p) => [
          p.id,
          p.name,
        ])
      : [],
  );
  for (const a of assignments) {
    const name = a.planId !== null ? names.get(a.planId) : undefined;
    out.set(a.id, name !== undefined ? { planId: a.planId!, name } : null);
  }
  return out;
}

async function planned(athleteId: number, from: string, to: string, transaction?: Transaction) {
  return ScheduledSession.findAll({
    where: { athleteId, status: "planned", date: { [Op.between]: [from, to] } },
    order: [["date", "ASC"]],
    transaction,
  });
}

/** Maximal tests per day: every field-test session counts, since each protocol is an all-out effort. */
function testClashes(
  entries: PlacementEntry[],
  existing: { date: string; name: string; testProtocol: string | null }[],
) {
  const byDay = new Map<string, string[]>();
  for (const e of [...existing, ...entries])
    if (e.testProtocol) byDay.set(e.date, [...(byDay.get(e.date) ?? []), e.name]);
  return [...byDay]
    .filter(([, names]) => names.length > 1)
    .map(([date, names]) => ({ date, names }))
    .sort((a, b) => a.date.localeCompare(b.date));
}

export async function checkPlacement(
  athleteId: number,
  entries: PlacementEntry[],
  opts: { replaceFrom?: string; transaction?: Transaction } = {},
): Promise<PlacementReport> {
  const { transaction } = opts;
  const report: PlacementReport = { athleteId, sportsWithoutThreshold: [], overlap: null, testDays: [] };
  if (entries.length === 0) return report;
  const dates = entries.map((e) => e.date).sort();
  const from = dates[0];
  const to = dates.at(-1)!;

  const have = await sportsWithThreshold(athleteId, transaction);
  const needed = new Set(
    entries.map((e) => thresholdSport(e.sport)).filter((s): s is NonNullable<typeof s> => s !== null),
  );
  report.sportsWithoutThreshold = [...needed].filter((s) => !have.has(s)).sort();

  const existing = await planned(athleteId, from, to, transaction);
  if (existing.length) {
    const assignmentIds = [...new Set(existing.map((s) => s.assignmentId).filter((id): id is number => id != null))];
    const plans = new Map<number, string>();
    for (const plan of (await plansOf(assignmentIds, transaction)).values())
      if (plan) plans.set(plan.planId, plan.name);
    report.overlap = {
      from: existing[0].date,
      to: existing.at(-1)!.date,
      sessions: existing.length,
      plans: [...plans.values()].sort(),
    };
  }
  const kept = opts.replaceFrom ? existing.filter((s) => s.date < opts.replaceFrom!) : existing;
  report.testDays = testClashes(entries, kept);
  return report;
}

/**
 * Enforces the coach's answer to a report and, for "replace", cancels the planned sessions from the chosen date on
 * (done and skipped sessions stay; the feed sees the cancellation through a higher sequence). Throws when the
 * report needs an answer that was not given, so a stale form never writes past a new conflict.
 */
export async function applyPlacementChoice(
  athleteId: number,
  entries: PlacementEntry[],
  choice: PlacementChoice,
  transaction: Transaction,
): Promise<{ cancelled: number }> {
  const replaceFrom =
    choice.overlap === "replace" ? (choice.replaceFrom ?? entries.map((e) => e.date).sort()[0]) : undefined;
  const report = await checkPlacement(athleteId, entries, { replaceFrom, transaction });
  if (report.sportsWithoutThreshold.length && !choice.confirmSports)
    throw new DomainError(
      "confirm_needed",
      `No threshold yet for ${report.sportsWithoutThreshold.join(", ")}: confirm to place the plan anyway.`,
    );
  if (report.overlap && !choice.overlap)
    throw new DomainError(
      "confirm_needed",
      "Sessions are already planned in these weeks: choose to replace them from a date or to place the plan alongside.",
    );
  if (report.testDays.length && !choice.confirmTests)
    throw new DomainError(
      "confirm_needed",
      `Two maximal tests would fall on ${report.testDays.map((d) => d.date).join(", ")}: confirm, or replace the sessions already there.`,
    );
  if (!replaceFrom || !report.overlap) return { cancelled: 0 };
  const last = entries
    .map((e) => e.date)
    .sort()
    .at(-1)!;
  const doomed = await planned(athleteId, replaceFrom, last, transaction);
  for (const s of doomed)
    await s.update({ status: "cancelled", cancelledAt: new Date(), feedSequence: s.feedSequence + 1 }, { transaction });
  return { cancelled: doomed.length };
}

/**
 * What placing a plan would run into, for the shop's check before a purchase (no start date chosen yet): the plans
 * already on the calendar with dates still to come, and which of the plan's sports the athlete has no threshold for
 * (their targeted sessions will say "needs a field test").
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
  const plans = await plansOf([...spans.keys()]);
  const current: PlanSpan[] = [...plans]
    .map(([id, plan]) => ({ name: plan?.name || "a plan on your calendar", ...spans.get(id)! }))
    .sort((a, b) => a.from.localeCompare(b.from));

  const items = await PlanItem.findAll({ where: { planId }, attributes: ["sport", "blocks"] });
  const have = await sportsWithThreshold(athleteId);
  const missing = new Map<string, number>();
  for (const item of items) {
    const tsport = thresholdSport(item.sport);
    if (!tsport || have.has(tsport)) continue;
    const targeted = expandBlocks(item.blocks as Block[]).some((s) => s.metric !== null);
    if (targeted) missing.set(tsport, (missing.get(tsport) ?? 0) + 1);
  }
  return { current, missingThresholds: [...missing.entries()].map(([sport, sessions]) => ({ sport, sessions })) };
}
