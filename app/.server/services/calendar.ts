import { Op, QueryTypes } from "sequelize";
import { db, lockRow, writeTransaction } from "../db";
import { ScheduledBlock, ScheduledSession } from "../models";
import { thresholdHistory } from "./thresholds";
import { resolveSteps } from "./materialize";
import { blockLines, keyTarget, type StepView } from "~/lib/schedule-text";
import { DomainError } from "../errors";
import type { CalendarEntry } from "~/lib/calendar-entry";

export function stepView(b: ScheduledBlock): StepView {
  return {
    position: b.position,
    blockIndex: b.blockIndex,
    kind: b.kind,
    part: b.part,
    rep: b.rep,
    repCount: b.repCount,
    durationS: b.durationS,
    metric: b.metric,
    lowPct: b.lowPct,
    highPct: b.highPct,
    ramp: Boolean(b.ramp),
    lowAbs: b.lowAbs,
    highAbs: b.highAbs,
    unit: b.unit,
    cue: b.cue,
  };
}

export type { CalendarEntry };

export async function calendarRange(athleteId: number, from: string, to: string): Promise<CalendarEntry[]> {
  const sessions = await ScheduledSession.findAll({
    where: { athleteId, date: { [Op.between]: [from, to] }, status: { [Op.ne]: "cancelled" } },
    order: [
      ["date", "ASC"],
      ["position", "ASC"],
      ["id", "ASC"],
    ],
  });
  // Plain SQL: building a model instance per step costs several times the query itself.
  const blocks = sessions.length
    ? await db().query<ScheduledBlock>(
        `SELECT scheduled_session_id AS "scheduledSessionId", position, block_index AS "blockIndex", kind, part, rep, rep_count AS "repCount",
                duration_s AS "durationS", metric, low_pct AS "lowPct", high_pct AS "highPct", ramp, low_abs AS "lowAbs", high_abs AS "highAbs", unit, cue
         FROM scheduled_blocks WHERE scheduled_session_id IN (SELECT id FROM scheduled_sessions WHERE athlete_id = ? AND date BETWEEN ? AND ? AND status != 'cancelled')
         ORDER BY scheduled_session_id, position`,
        { replacements: [athleteId, from, to], type: QueryTypes.SELECT },
      )
    : [];
  const bySession = new Map<number, StepView[]>();
  for (const b of blocks) {
    const list = bySession.get(b.scheduledSessionId) ?? [];
    list.push(stepView(b));
    bySession.set(b.scheduledSessionId, list);
  }
  return sessions.map((s) => {
    const steps = bySession.get(s.id) ?? [];
    const lines = blockLines(steps);
    return {
      id: s.id,
      date: s.date,
      position: s.position,
      timeOfDay: s.timeOfDay,
      name: s.name,
      sport: s.sport,
      status: s.status,
      testProtocol: s.testProtocol,
      plannedDurationS: s.plannedDurationS,
      plannedLoad: s.plannedLoad,
      effortScore: s.effortScore,
      keyTarget: keyTarget(steps),
      needsTest: lines.some((l) => l.needsTest),
      lines: lines.map((l) => l.text),
    };
  });
}

export async function sessionDetail(athleteId: number, id: number) {
  const session = Number.isInteger(id) && id > 0 ? await ScheduledSession.findOne({ where: { id, athleteId } }) : null;
  if (!session) return null;
  const blocks = await ScheduledBlock.findAll({ where: { scheduledSessionId: id }, order: [["position", "ASC"]] });
  return {
    session,
    steps: blocks.map(stepView),
    thresholdValues: [...new Set(blocks.map((b) => b.thresholdValue).filter((v) => v !== null))],
  };
}

/**
 * Moves a planned session to another day. Targets are resolved again for the new date (a threshold may differ),
 * and the feed sequence moves on so subscribed calendars pick the change up.
 */
export async function moveSession(athleteId: number, id: number, date: string) {
  return writeTransaction(async (transaction) => {
    // Re-resolved from the thresholds: a rescale of this athlete and this move take turns (PostgreSQL row lock).
    await lockRow("users", athleteId, transaction);
    const session = await ScheduledSession.findOne({ where: { id, athleteId }, transaction });
    if (!session) throw new DomainError("not_found", "That session is not on this calendar.");
    if (session.status !== "planned")
      throw new DomainError("invalid", "Only planned sessions can be moved; this one is already done or skipped.");
    const old = await ScheduledBlock.findAll({
      where: { scheduledSessionId: id },
      order: [["position", "ASC"]],
      transaction,
    });
    const history = await thresholdHistory(athleteId, transaction);
    const last = (await ScheduledSession.max("position", { where: { athleteId, date }, transaction })) as number | null;
    await session.update(
      { date, position: last === null ? 0 : last + 1, feedSequence: session.feedSequence + 1 },
      { transaction },
    );
    // Each step keeps its percentages; only the absolute numbers are looked up again for the new date.
    for (const b of old) {
      const fresh = resolveOne(b, history, date, session.sport, athleteId);
      await ScheduledBlock.update(
        {
          date,
          lowAbs: fresh.lowAbs,
          highAbs: fresh.highAbs,
          unit: fresh.unit,
          thresholdId: fresh.thresholdId,
          thresholdValue: fresh.thresholdValue,
        },
        { where: { id: b.id }, transaction },
      );
    }
    return session;
  });
}

/** One stored step resolved again: treated as a run from its low to its high percentage, as every step is. */
function resolveOne(
  b: ScheduledBlock,
  history: Awaited<ReturnType<typeof thresholdHistory>>,
  date: string,
  sport: string,
  athleteId: number,
) {
  if (b.metric === null || b.lowPct === null || b.highPct === null)
    return { lowAbs: null, highAbs: null, unit: null, thresholdId: null, thresholdValue: null };
  const [row] = resolveSteps(
    [{ kind: "ramp", durationS: b.durationS, metric: b.metric as "power", fromPct: b.lowPct, toPct: b.highPct }],
    { athleteId, date, sport, history },
  );
  return row;
}

export async function completeSession(
  athleteId: number,
  id: number,
  input: {
    status: "done" | "skipped" | "planned";
    effortScore: number | null;
    minutes: number | null;
    comment: string;
  },
) {
  return writeTransaction(async (transaction) => {
    // A rescale changes only planned sessions: a completion must not slip in between its read and its write.
    await lockRow("users", athleteId, transaction);
    const session = await ScheduledSession.findOne({ where: { id, athleteId }, transaction });
    if (!session) throw new DomainError("not_found", "That session is not on this calendar.");
    if (session.status === "cancelled") throw new DomainError("invalid", "This session was removed from the plan.");
    await session.update(
      {
        status: input.status,
        effortScore: input.status === "done" ? input.effortScore : null,
        actualMinutes: input.status === "done" ? input.minutes : null,
        comment: input.comment || null,
        completedAt: input.status === "planned" ? null : new Date(),
        feedSequence: session.feedSequence + 1,
      },
      { transaction },
    );
    return session;
  });
}
