/**
 * Over 300 lines on purpose: resolving steps, placing a plan and pushing its changes share one insert path for
 * sessions and their steps, so a placement writes the same rows whichever entry point made it.
 */
import { Op, type InferCreationAttributes, type Transaction } from "sequelize";
import { lockRow, writeTransaction } from "../db";
import {
  Assignment,
  CoachAthlete,
  PlanItem,
  PlanWeek,
  ScheduledBlock,
  ScheduledSession,
  SeasonPlan,
  User,
} from "../models";
import {
  applyPlacementChoice,
  checkPlacement,
  needsChoice,
  type PlacementChoice,
  type PlacementEntry,
  type PlacementReport,
} from "./placement";
import { thresholdHistory, thresholdOn, thresholdSport, unitFor, type ThresholdRow } from "./thresholds";
import { addDays, mondayOf, todayIn, weekday } from "~/lib/dates";
import { blockDuration, estimateSession, expandBlocks, resolveTarget, type Block } from "~/lib/training";
import { DomainError } from "../errors";

type BlockRow = Omit<InferCreationAttributes<ScheduledBlock>, "scheduledSessionId" | "id">;

/**
 * Resolves every step of a session to the athlete's numbers for the threshold in force on its date. A step whose
 * metric has no threshold yet keeps only its percentages (the "needs a field test" state).
 */
export function resolveSteps(
  blocks: Block[],
  ctx: { athleteId: number; date: string; sport: string; history: ThresholdRow[] },
): BlockRow[] {
  const tsport = thresholdSport(ctx.sport);
  return expandBlocks(blocks).map((step, position) => {
    const spec = blocks[step.blockIndex];
    const threshold = tsport && step.metric ? thresholdOn(ctx.history, tsport, step.metric, ctx.date) : null;
    let lowAbs: number | null = null;
    let highAbs: number | null = null;
    let unit: string | null = null;
    if (threshold && step.metric && step.lowPct !== null && step.highPct !== null) {
      const u = unitFor(tsport!, step.metric);
      // A ramp may run downwards; resolve each end on its own.
      const lo = resolveTarget({ metric: step.metric, lowPct: step.lowPct }, threshold.value, {
        paceUnit: u === "s/100m" ? "s/100m" : "s/km",
      });
      const hi = resolveTarget({ metric: step.metric, lowPct: step.highPct }, threshold.value, {
        paceUnit: u === "s/100m" ? "s/100m" : "s/km",
      });
      lowAbs = lo.low;
      highAbs = hi.low;
      unit = u;
    }
    return {
      athleteId: ctx.athleteId,
      date: ctx.date,
      sport: ctx.sport,
      position,
      blockIndex: step.blockIndex,
      kind: step.kind,
      part: step.part,
      rep: step.rep,
      repCount: spec.kind === "repeats" ? spec.count : null,
      durationS: step.durationS,
      metric: step.metric,
      lowPct: step.lowPct,
      highPct: step.highPct,
      ramp: step.ramp,
      lowAbs,
      highAbs,
      unit,
      thresholdId: threshold ? threshold.id : null,
      thresholdValue: threshold ? threshold.value : null,
      cue: "cue" in spec ? (spec.cue ?? null) : null,
      cadence: "cadence" in spec ? (spec.cadence ?? null) : null,
    };
  });
}

function plannedLoad(blocks: Block[]) {
  try {
    return estimateSession(blocks).plannedEffortLoad;
  } catch {
    return 0;
  }
}

interface ItemWithWeek {
  item: PlanItem;
  weekIdx: number;
}

async function planItems(planId: number, transaction?: Transaction): Promise<ItemWithWeek[]> {
  const weeks = await PlanWeek.findAll({ where: { planId }, transaction });
  const idx = new Map(weeks.map((w) => [w.id, w.idx]));
  const items = await PlanItem.findAll({
    where: { planId },
    order: [
      ["day", "ASC"],
      ["position", "ASC"],
    ],
    transaction,
  });
  return items.map((item) => ({ item, weekIdx: idx.get(item.weekId)! }));
}

const dateOf = (start: string, weekIdx: number, day: number) => addDays(start, (weekIdx - 1) * 7 + day);

/**
 * Inserts sessions and their resolved steps with multi-row INSERTs (sessions RETURNING their ids): a 416-session
 * plan is a dozen statements, not one create and one bulk insert per session.
 */
async function insertScheduled(
  athleteId: number,
  assignmentId: number,
  entries: ItemWithWeek[],
  startDate: string,
  history: ThresholdRow[],
  transaction: Transaction,
) {
  const SESSION_CHUNK = 250;
  const STEP_CHUNK = 1000;
  const placed = entries.map(({ item, weekIdx }) => ({
    item,
    blocks: item.blocks as Block[],
    date: dateOf(startDate, weekIdx, item.day),
  }));
  const ids: number[] = [];
  for (let i = 0; i < placed.length; i += SESSION_CHUNK) {
    const created = await ScheduledSession.bulkCreate(
      placed.slice(i, i + SESSION_CHUNK).map(({ item, blocks, date }) => ({
        athleteId,
        assignmentId,
        planItemId: item.id,
        date,
        position: item.position,
        timeOfDay: item.timeOfDay,
        name: item.name,
        sport: item.sport,
        testProtocol: item.testProtocol,
        notes: item.notes,
        description: item.description,
        plannedDurationS: blocks.reduce((s, b) => s + blockDuration(b), 0),
        plannedLoad: plannedLoad(blocks),
      })),
      { transaction, returning: true },
    );
    ids.push(...created.map((c) => c.id));
  }
  const steps = placed.flatMap(({ item, blocks, date }, i) =>
    resolveSteps(blocks, { athleteId, date, sport: item.sport, history }).map((r) => ({
      ...r,
      scheduledSessionId: ids[i],
    })),
  );
  // Straight to the query interface: building thousands of model instances cost more than the INSERTs themselves.
  const qi = ScheduledBlock.sequelize!.getQueryInterface();
  for (let i = 0; i < steps.length; i += STEP_CHUNK) {
    await qi.bulkInsert("scheduled_blocks", steps.slice(i, i + STEP_CHUNK).map(stepRow), { transaction });
  }
}

/** A resolved step as a scheduled_blocks row (column names as the migration writes them). */
function stepRow(r: BlockRow & { scheduledSessionId: number }) {
  return {
    scheduled_session_id: r.scheduledSessionId,
    athlete_id: r.athleteId,
    date: r.date,
    sport: r.sport,
    position: r.position,
    block_index: r.blockIndex,
    kind: r.kind,
    part: r.part,
    rep: r.rep ?? null,
    rep_count: r.repCount ?? null,
    duration_s: r.durationS,
    metric: r.metric ?? null,
    low_pct: r.lowPct ?? null,
    high_pct: r.highPct ?? null,
    ramp: r.ramp,
    low_abs: r.lowAbs ?? null,
    high_abs: r.highAbs ?? null,
    unit: r.unit ?? null,
    threshold_id: r.thresholdId ?? null,
    threshold_value: r.thresholdValue ?? null,
    cue: r.cue ?? null,
    cadence: r.cadence ?? null,
  };
}

/** The plan's sessions on the dates they would take from a week-1 Monday, for the placement checks. */
export async function planEntries(planId: number, start: string, transaction?: Transaction): Promise<PlacementEntry[]> {
  return (await planItems(planId, transaction)).map(({ item, weekIdx }) => ({
    date: dateOf(start, weekIdx, item.day),
    name: item.name,
    sport: item.sport,
    testProtocol: item.testProtocol,
  }));
}

/**
 * Places a plan on one athlete's calendar in one transaction: an Assignment and a ScheduledSession (with resolved
 * ScheduledBlocks) for every plan item. `start` is the Monday of week 1 in the athlete's own calendar.
 */
export async function materialize(
  planId: number,
  athlete: User,
  start: string,
  opts: { assignedBy: number | null; transaction: Transaction },
) {
  const { transaction } = opts;
  // Targets are resolved from the athlete's thresholds: a rescale of the same athlete waits for this, or this for it.
  await lockRow("users", athlete.id, transaction);
  const plan = await SeasonPlan.findByPk(planId, { transaction });
  if (!plan) throw new DomainError("not_found", "That plan no longer exists.");
  const assignment = await Assignment.create(
    { athleteId: athlete.id, planId, assignedBy: opts.assignedBy, startDate: start, planVersion: plan.version },
    { transaction },
  );
  const history = await thresholdHistory(athlete.id, transaction);
  await insertScheduled(athlete.id, assignment.id, await planItems(planId, transaction), start, history, transaction);
  return assignment;
}

/** Week 1's Monday for a plan placed from a start date (the next Monday on or after it) or to end on an event. */
export function alignStart(mode: "start" | "event", date: string, weeks: number): string {
  if (mode === "start") return weekday(date) === 0 ? date : addDays(mondayOf(date), 7);
  return addDays(mondayOf(date), -(weeks - 1) * 7);
}

/**
 * Assigns a plan to athletes. Without a `choice`, nothing is written when any athlete's calendar needs a decision
 * (missing thresholds for the plan's sports, sessions already planned in those weeks, two maximal tests on a day):
 * the reports come back for the coach to choose. With a choice, each athlete's check runs again inside the write.
 */
export async function assignPlan(
  coach: User,
  planId: number,
  athleteIds: number[],
  opts: { mode: "start" | "event"; date: string; choice?: PlacementChoice },
) {
  const plan = await SeasonPlan.findOne({ where: { id: planId, ownerId: coach.id } });
  if (!plan) throw new DomainError("not_found", "No plan with this id is yours.");
  const links = await CoachAthlete.findAll({ where: { coachId: coach.id, athleteId: athleteIds } });
  if (links.length !== new Set(athleteIds).size)
    throw new DomainError("not_found", "Athletes can only be given plans by their own coach.");
  const weeks = await PlanWeek.count({ where: { planId } });
  const start = alignStart(opts.mode, opts.date, weeks);
  const athletes = await User.findAll({ where: { id: athleteIds } });
  const entries = await planEntries(planId, start);
  if (!opts.choice) {
    const reports: PlacementReport[] = [];
    for (const a of athletes) reports.push(await checkPlacement(a.id, entries));
    if (reports.some(needsChoice)) return { start, reports: reports.filter(needsChoice), results: [] };
  }
  const results: { athleteId: number; assignmentId: number; sessions: number; cancelled: number }[] = [];
  // One transaction per athlete: one athlete's failure does not undo another's calendar.
  for (const athlete of athletes) {
    const { assignment, cancelled } = await writeTransaction(async (transaction) => {
      const { cancelled } = await applyPlacementChoice(athlete.id, entries, opts.choice ?? {}, transaction);
      return {
        assignment: await materialize(planId, athlete, start, { assignedBy: coach.id, transaction }),
        cancelled,
      };
    });
    results.push({
      athleteId: athlete.id,
      assignmentId: assignment.id,
      sessions: await ScheduledSession.count({ where: { assignmentId: assignment.id } }),
      cancelled,
    });
  }
  return { start, reports: [] as PlacementReport[], results };
}

/**
 * Brings assigned calendars up to the plan's current version for sessions from today on. Sessions still in the plan
 * are rewritten in place (same row, so the same calendar UID, with a higher sequence); sessions no longer in it are
 * cancelled, and new plan items are added. Past, done and skipped sessions are never touched.
 */
export async function pushPlanChanges(coach: User, planId: number) {
  const plan = await SeasonPlan.findOne({ where: { id: planId, ownerId: coach.id } });
  if (!plan) throw new DomainError("not_found", "No plan with this id is yours.");
  const assignments = await Assignment.findAll({ where: { planId } });
  let updated = 0;
  for (const assignment of assignments) {
    const athlete = await User.findByPk(assignment.athleteId);
    if (!athlete) continue;
    const today = todayIn(athlete.timezone);
    await writeTransaction(async (transaction) => {
      await lockRow("users", athlete.id, transaction);
      const entries = await planItems(planId, transaction);
      const history = await thresholdHistory(athlete.id, transaction);
      const future = await ScheduledSession.findAll({
        where: { assignmentId: assignment.id, status: "planned", date: { [Op.gte]: today } },
        transaction,
      });
      const pastItemIds = new Set(
        (
          await ScheduledSession.findAll({
            where: {
              assignmentId: assignment.id,
              [Op.or]: [{ date: { [Op.lt]: today } }, { status: { [Op.ne]: "planned" } }],
            },
            attributes: ["planItemId"],
            transaction,
          })
        ).map((s) => s.planItemId),
      );
      const byItem = new Map(future.map((s) => [s.planItemId, s]));
      const toAdd: ItemWithWeek[] = [];
      for (const entry of entries) {
        const date = dateOf(assignment.startDate, entry.weekIdx, entry.item.day);
        const existing = byItem.get(entry.item.id);
        byItem.delete(entry.item.id);
        if (date < today || pastItemIds.has(entry.item.id)) continue;
        if (!existing) {
          toAdd.push(entry);
          continue;
        }
        const blocks = entry.item.blocks as Block[];
        await existing.update(
          {
            date,
            position: entry.item.position,
            timeOfDay: entry.item.timeOfDay,
            name: entry.item.name,
            sport: entry.item.sport,
            testProtocol: entry.item.testProtocol,
            notes: entry.item.notes,
            description: entry.item.description,
            plannedDurationS: blocks.reduce((s, b) => s + blockDuration(b), 0),
            plannedLoad: plannedLoad(blocks),
            feedSequence: existing.feedSequence + 1,
          },
          { transaction },
        );
        await ScheduledBlock.destroy({ where: { scheduledSessionId: existing.id }, transaction });
        const rows = resolveSteps(blocks, { athleteId: athlete.id, date, sport: entry.item.sport, history });
        if (rows.length)
          await ScheduledBlock.bulkCreate(
            rows.map((r) => ({ ...r, scheduledSessionId: existing.id })),
            { transaction },
          );
        updated++;
      }
      for (const gone of byItem.values()) {
        await gone.update(
          { status: "cancelled", cancelledAt: new Date(), feedSequence: gone.feedSequence + 1 },
          { transaction },
        );
      }
      await insertScheduled(athlete.id, assignment.id, toAdd, assignment.startDate, history, transaction);
      updated += toAdd.length;
      await assignment.update({ planVersion: plan.version }, { transaction });
    });
  }
  return { assignments: assignments.length, updated };
}
