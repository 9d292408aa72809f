/**
 * Over 300 lines on purpose: this is the one service for a season plan's skeleton (creating, reading and editing its
 * weeks, phases, items and recurrences), every call checked against the plan's owner and every edit bumping its
 * version; some twenty routes, tests and scripts use it, and splitting it would scatter that check and that bump.
 */
import rrule from "rrule";
import { literal, Op, QueryTypes, type Transaction } from "sequelize";
import { db, dialect, writeTransaction } from "../db";
import { PlanItem, PlanRecurrence, PlanWeek, SeasonPlan } from "../models";
import { getShelfSession } from "./shelf";
import { defaultTestFor } from "~/lib/protocols";
import { recurrenceSummary, type NewPlanInput } from "~/lib/plans";
import { blockDuration, seasonSkeleton, type Block } from "~/lib/training";
import { addDays, addWeeks, daysBetween, fromMs, toMs } from "~/lib/dates";
import { DomainError } from "../errors";

const { RRule } = rrule;

/** Day index of the automatic field test in a test week: Tuesday, after a Monday rest day. */
const TEST_DAY = 1;

export async function createPlan(ownerId: number, input: NewPlanInput): Promise<SeasonPlan> {
  const skeleton = seasonSkeleton({
    ...(input.alignment === "event" ? { eventDate: input.date } : { startDate: input.date }),
    weeks: input.weeks,
    weeklyHours: input.weeklyHours,
    pattern: input.pattern,
    testEveryWeeks: input.testEveryWeeks,
  });
  const test = defaultTestFor(input.sport);
  return writeTransaction(async (transaction) => {
    const plan = await SeasonPlan.create(
      {
        ownerId,
        name: input.name,
        sport: input.sport,
        description: input.description,
        alignment: input.alignment,
        startDate: skeleton.startDate,
        eventDate: skeleton.eventDate,
        weeklyHours: input.weeklyHours,
        pattern: input.pattern,
        testEveryWeeks: input.testEveryWeeks,
      },
      { transaction },
    );
    const weeks = await PlanWeek.bulkCreate(
      skeleton.weeks.map((w) => ({
        planId: plan.id,
        idx: w.index,
        phase: w.phase,
        recovery: w.recovery,
        test: w.test,
        loadFactor: w.loadFactor,
        plannedHours: w.hours,
      })),
      { transaction },
    );
    const testWeeks = weeks.filter((w) => w.test);
    if (test.session) {
      await PlanItem.bulkCreate(
        testWeeks.map((w) => ({
          planId: plan.id,
          weekId: w.id,
          day: TEST_DAY,
          position: 0,
          name: test.session!.name,
          sport: input.sport === "multi" ? "bike" : input.sport,
          testProtocol: test.key,
          blocks: test.session!.blocks,
        })),
        { transaction },
      );
    }
    return plan;
  });
}

export async function requirePlan(ownerId: number, planId: number, transaction?: Transaction): Promise<SeasonPlan> {
  // Inside a write the plan row is locked (PostgreSQL; SQLite has one writer anyway), so concurrent changes to one
  // plan queue on the database, whichever instance they arrive at.
  const plan =
    Number.isInteger(planId) && planId > 0
      ? await SeasonPlan.findOne({
          where: { id: planId, ownerId },
          transaction,
          lock: transaction ? transaction.LOCK.UPDATE : undefined,
        })
      : null;
  if (!plan) throw new DomainError("not_found", "No plan with this id is yours.");
  return plan;
}

export interface PlanItemView {
  id: number;
  weekId: number;
  day: number;
  position: number;
  name: string;
  sport: string;
  testProtocol: string | null;
  blocks: Block[];
  durationS: number;
  timeOfDay: string | null;
  recurrenceId: number | null;
  sourceSessionId: number | null;
  /** The coach's note for this placed session (reaches the athlete's session page and feed). */
  notes: string;
  description: string;
}

export async function loadPlan(ownerId: number, planId: number) {
  const plan = await requirePlan(ownerId, planId);
  const [weeks, items, recurrences] = await Promise.all([
    PlanWeek.findAll({ where: { planId }, order: [["idx", "ASC"]] }),
    PlanItem.findAll({
      where: { planId },
      order: [
        ["day", "ASC"],
        ["position", "ASC"],
      ],
    }),
    PlanRecurrence.findAll({ where: { planId }, order: [["id", "ASC"]] }),
  ]);
  return {
    plan: {
      id: plan.id,
      name: plan.name,
      sport: plan.sport,
      description: plan.description,
      alignment: plan.alignment,
      startDate: plan.startDate,
      eventDate: plan.eventDate,
      weeklyHours: plan.weeklyHours,
      pattern: plan.pattern,
      testEveryWeeks: plan.testEveryWeeks,
      version: plan.version,
    },
    weeks: weeks.map((w) => ({
      id: w.id,
      idx: w.idx,
      phase: w.phase,
      recovery: w.recovery,
      test: w.test,
      loadFactor: w.loadFactor,
      plannedHours: w.plannedHours,
      notes: w.notes,
    })),
    items: items.map(itemView),
    recurrences: recurrences.map((r) => ({
      id: r.id,
      summary: r.summary,
      rule: r.rule,
      count: items.filter((i) => i.recurrenceId === r.id).length,
    })),
  };
}

export function itemView(i: PlanItem): PlanItemView {
  const blocks = i.blocks as Block[];
  return {
    id: i.id,
    weekId: i.weekId,
    day: i.day,
    position: i.position,
    name: i.name,
    sport: i.sport,
    testProtocol: i.testProtocol,
    blocks,
    durationS: blocks.reduce((s, b) => s + blockDuration(b), 0),
    timeOfDay: i.timeOfDay,
    recurrenceId: i.recurrenceId,
    sourceSessionId: i.sourceSessionId,
    notes: i.notes,
    description: i.description,
  };
}

export async function listPlans(ownerId: number) {
  return db().query<{
    id: number;
    name: string;
    sport: string;
    start_date: string | null;
    event_date: string | null;
    weeks: number;
    sessions: number;
    phases: string | null;
    athletes: number;
    listed: number;
    updated_at: string;
  }>(
    `SELECT p.id, p.name, p.sport, p.start_date, p.event_date, p.updated_at,
            (SELECT COUNT(*) FROM plan_weeks w WHERE w.plan_id = p.id) AS weeks,
            (SELECT COUNT(*) FROM plan_items i WHERE i.plan_id = p.id) AS sessions,
            ${dialect() === "postgres" ? "(SELECT string_agg(phase, ',' ORDER BY idx) FROM plan_weeks w WHERE w.plan_id = p.id)" : "(SELECT GROUP_CONCAT(phase, ',') FROM (SELECT phase FROM plan_weeks w WHERE w.plan_id = p.id ORDER BY idx))"} AS phases,
            ${(await tableExists("assignments")) ? "(SELECT COUNT(DISTINCT athlete_id) FROM assignments a WHERE a.plan_id = p.id)" : "0"} AS athletes,
            ${(await tableExists("listings")) ? "(SELECT COUNT(*) FROM listings l WHERE l.plan_id = p.id AND l.published = :published)" : "0"} AS listed
     FROM season_plans p WHERE p.owner_id = :ownerId ORDER BY p.updated_at DESC`,
    { replacements: { ownerId, published: true }, type: QueryTypes.SELECT },
  );
}

async function tableExists(name: string) {
  return db().getQueryInterface().tableExists(name);
}

/** Every change to a plan's weeks or items moves its version on; the board sends the version it was drawn from. */
export async function bumpVersion(planId: number, transaction: Transaction) {
  await SeasonPlan.update(
    { version: literal("version + 1") as unknown as number },
    { where: { id: planId }, transaction },
  );
}

export async function updateWeek(
  ownerId: number,
  planId: number,
  input: { weekId: number; phase: string; recovery: boolean; test: boolean; plannedHours: number; notes: string },
) {
  return writeTransaction(async (transaction) => {
    await requirePlan(ownerId, planId, transaction);
    const week = await PlanWeek.findOne({ where: { id: input.weekId, planId }, transaction });
    if (!week) throw new DomainError("not_found", "That week is not part of this plan.");
    await week.update(
      {
        phase: input.phase,
        recovery: input.recovery,
        test: input.test,
        plannedHours: input.plannedHours,
        notes: input.notes,
      },
      { transaction },
    );
    await bumpVersion(planId, transaction);
    return week;
  });
}

export interface WeekEdit {
  weekId: number;
  phase: string;
  recovery: boolean;
  test: boolean;
  plannedHours: number;
  loadFactor?: number;
  notes: string;
}

/** Saves every week of the table at once, in one transaction: all of them or, on any error, none. */
export async function updateWeeks(ownerId: number, planId: number, edits: WeekEdit[]) {
  return writeTransaction(async (transaction) => {
    await requirePlan(ownerId, planId, transaction);
    const weeks = await PlanWeek.findAll({ where: { planId, id: edits.map((e) => e.weekId) }, transaction });
    if (weeks.length !== new Set(edits.map((e) => e.weekId)).size)
      throw new DomainError("not_found", "That week is not part of this plan.");
    const byId = new Map(weeks.map((w) => [w.id, w]));
    let changed = 0;
    for (const e of edits) {
      const w = byId.get(e.weekId)!;
      const next = {
        phase: e.phase,
        recovery: e.recovery,
        test: e.test,
        plannedHours: e.plannedHours,
        loadFactor: e.loadFactor ?? w.loadFactor,
        notes: e.notes,
      };
      if (Object.entries(next).every(([k, v]) => w.get(k as keyof typeof next) === v)) continue;
      await w.update(next, { transaction });
      changed++;
    }
    if (changed) await bumpVersion(planId, transaction);
    return changed;
  });
}

/** Sets phase, hours and load factor (each optional) on a run of weeks: one change for many weeks. */
export async function editWeekRange(
  ownerId: number,
  planId: number,
  input: { fromWeek: number; toWeek: number; phase?: string; plannedHours?: number; loadFactor?: number },
) {
  return writeTransaction(async (transaction) => {
    await requirePlan(ownerId, planId, transaction);
    const count = await PlanWeek.count({ where: { planId }, transaction });
    if (input.toWeek > count) throw new DomainError("invalid", `This plan has ${count} weeks.`, { field: "toWeek" });
    const set = {
      ...(input.phase ? { phase: input.phase } : {}),
      ...(input.plannedHours !== undefined ? { plannedHours: input.plannedHours } : {}),
      ...(input.loadFactor !== undefined ? { loadFactor: input.loadFactor } : {}),
    };
    if (Object.keys(set).length === 0)
      throw new DomainError("invalid", "Choose at least one thing to change.", { field: "phase" });
    const [n] = await PlanWeek.update(set, {
      where: { planId, idx: { [Op.between]: [input.fromWeek, input.toWeek] } },
      transaction,
    });
    await bumpVersion(planId, transaction);
    return n;
  });
}

/** Sets one phase on a run of weeks: how a coach makes a phase longer or shorter. */
export async function setPhaseRange(
  ownerId: number,
  planId: number,
  input: { phase: string; fromWeek: number; toWeek: number },
) {
  return writeTransaction(async (transaction) => {
    await requirePlan(ownerId, planId, transaction);
    const count = await PlanWeek.count({ where: { planId }, transaction });
    if (input.toWeek > count) throw new DomainError("invalid", `This plan has ${count} weeks.`, { field: "toWeek" });
    const [n] = await PlanWeek.update(
      { phase: input.phase },
      { where: { planId, idx: { [Op.between]: [input.fromWeek, input.toWeek] } }, transaction },
    );
    await bumpVersion(planId, transaction);
    return n;
  });
}

export async function renamePlan(ownerId: number, planId: number, name: string, description: string) {
  return writeTransaction(async (transaction) => {
    const plan = await requirePlan(ownerId, planId, transaction);
    await plan.update({ name, description }, { transaction });
  });
}

/** Anchor for plans without dates: any Monday serves, since only weekday and week number matter. */
const UNALIGNED_ANCHOR = "2001-01-01";

/**
 * Adds a session on the given weekdays of weeks fromWeek–toWeek, expanded through an RRULE (weekly, BYDAY, from the
 * first week's Monday until the last week's Sunday). Every occurrence becomes its own plan item, so each stays
 * editable; the rule is kept to show it in words.
 */
export async function addRecurrence(
  ownerId: number,
  planId: number,
  input: { sessionId: number; days: number[]; fromWeek: number; toWeek: number; timeOfDay?: string },
) {
  const found = await getShelfSession(ownerId, input.sessionId);
  if (!found) throw new DomainError("not_found", "That session is not on your shelf.", { field: "sessionId" });
  return writeTransaction(async (transaction) => {
    const plan = await requirePlan(ownerId, planId, transaction);
    const weeks = await PlanWeek.findAll({ where: { planId }, order: [["idx", "ASC"]], transaction });
    if (input.toWeek > weeks.length)
      throw new DomainError("invalid", `This plan has ${weeks.length} weeks.`, { field: "toWeek" });
    const anchor = plan.startDate ?? UNALIGNED_ANCHOR;
    // rrule works in UTC instants; the plan's calendar days are midnight UTC of each date.
    const dtstart = new Date(toMs(addWeeks(anchor, input.fromWeek - 1)));
    const until = new Date(toMs(addDays(anchor, input.toWeek * 7 - 1)) + 86_399_000);
    const byday = [RRule.MO, RRule.TU, RRule.WE, RRule.TH, RRule.FR, RRule.SA, RRule.SU];
    const rule = new RRule({
      freq: RRule.WEEKLY,
      dtstart,
      until,
      byweekday: [...new Set(input.days)].sort().map((d) => byday[d]),
      wkst: RRule.MO,
    });
    const occurrences = rule.all().map((d) => {
      const days = daysBetween(anchor, fromMs(d.getTime()));
      return { weekIdx: Math.floor(days / 7) + 1, day: days % 7 };
    });
    const recurrence = await PlanRecurrence.create(
      {
        planId,
        sourceSessionId: input.sessionId,
        rule: rule.toString().split("\n").pop()!,
        summary: recurrenceSummary(input.days, input.fromWeek, input.toWeek),
      },
      { transaction },
    );
    const byIdx = new Map(weeks.map((w) => [w.idx, w]));
    for (const occ of occurrences) {
      const week = byIdx.get(occ.weekIdx)!;
      const last = (await PlanItem.max("position", { where: { weekId: week.id, day: occ.day }, transaction })) as
        number | null;
      await PlanItem.create(
        {
          planId,
          weekId: week.id,
          day: occ.day,
          position: last === null ? 0 : last + 1,
          sourceSessionId: input.sessionId,
          recurrenceId: recurrence.id,
          name: found.session.name,
          sport: found.session.sport,
          testProtocol: found.session.testProtocol,
          blocks: found.blocks,
          timeOfDay: input.timeOfDay ?? null,
        },
        { transaction },
      );
    }
    await bumpVersion(planId, transaction);
    return { recurrence, count: occurrences.length };
  });
}

export async function deletePlan(ownerId: number, planId: number) {
  return writeTransaction(async (transaction) => {
    const plan = await requirePlan(ownerId, planId, transaction);
    await plan.destroy({ transaction });
  });
}
