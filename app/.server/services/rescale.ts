/**
 * Over 300 lines on purpose: applying a threshold and undoing it share one scope definition and one SQL rounding
 * rule, and they stay side by side so an undo restores exactly what the apply wrote, on both databases.
 */
import { QueryTypes, type Transaction } from "sequelize";
import { db, dialect, sqlDate } from "../db";
import { RescaleReport, Threshold } from "../models";
import { stepTarget } from "~/lib/schedule-text";

/**
 * The set of steps a new threshold applies to: the athlete's planned sessions on the same sport and metric, dated
 * from `from` up to (not including) the next threshold already in force after it. Done, skipped and cancelled
 * sessions, other metrics and other athletes are outside it by construction.
 */
const SCOPE_CONDITIONS = `b.athlete_id = :athleteId AND b.sport = :sport AND b.metric = :metric AND b.low_pct IS NOT NULL
    AND b.date >= :from AND (:until IS NULL OR b.date < :until) AND s.status = 'planned'`;
const SCOPE = `
  FROM scheduled_blocks b JOIN scheduled_sessions s ON s.id = b.scheduled_session_id
  WHERE ${SCOPE_CONDITIONS}`;

/**
 * pct × threshold / 100 for power and heart rate, threshold ÷ (pct / 100) for pace (pct of speed), rounded as JS
 * Math.round rounds these positive values. SQLite computes in doubles and its ROUND adds 0.5 and truncates. On
 * PostgreSQL the same doubles are forced (a bare 100.0 is numeric there) and FLOOR(x + 0.5) replaces ROUND, whose
 * float8 form rounds halves to even (180.5 → 180, one watt off).
 */
const RESOLVE = (col: "low_pct" | "high_pct", table = "", value = ":value") => {
  if (dialect() === "postgres") {
    const v = `CAST(${value} AS DOUBLE PRECISION)`;
    const pct = `CAST(${table}${col} AS DOUBLE PRECISION)`;
    const hundred = "CAST(100 AS DOUBLE PRECISION)";
    return `CASE WHEN ${table}metric = 'pace' THEN CAST(FLOOR(${v} / (${pct} / ${hundred}) + 0.5) AS INTEGER) ELSE CAST(FLOOR(${pct} * ${v} / ${hundred} + 0.5) AS INTEGER) END`;
  }
  return `CASE WHEN ${table}metric = 'pace' THEN CAST(ROUND(${value} / (${table}${col} / 100.0)) AS INTEGER) ELSE CAST(ROUND(${table}${col} * ${value} / 100.0) AS INTEGER) END`;
};

/**
 * Whether a step holds exactly what the old threshold gives it (NULL throughout when there was none): then the undo
 * can recompute it instead of keeping a copy. Written as a CASE so a NULL comparison counts as "no", never unknown.
 */
const followsOld =
  () => `CASE WHEN (:oldId IS NULL AND b.threshold_id IS NULL AND b.threshold_value IS NULL AND b.unit IS NULL
      AND b.low_abs IS NULL AND b.high_abs IS NULL)
    OR (b.threshold_id = :oldId AND b.threshold_value = :oldValue AND b.unit = :oldUnit
      AND b.low_abs = ${RESOLVE("low_pct", "b.", ":oldValue")} AND b.high_abs = ${RESOLVE("high_pct", "b.", ":oldValue")})
  THEN 1 ELSE 0 END`;

async function nextThresholdAfter(
  athleteId: number,
  sport: string,
  metric: string,
  from: string,
  transaction: Transaction,
) {
  const [row] = await db().query<{ d: string | null }>(
    "SELECT MIN(effective_from) AS d FROM thresholds WHERE athlete_id = ? AND sport = ? AND metric = ? AND effective_from > ?",
    { replacements: [athleteId, sport, metric, from], type: QueryTypes.SELECT, transaction },
  );
  return row?.d ?? null;
}

export interface ScopeCounts {
  sessions: number;
  blocks: number;
}

export async function countScope(
  p: { athleteId: number; sport: string; metric: string; from: string },
  transaction?: Transaction,
): Promise<ScopeCounts & { until: string | null }> {
  const until = await nextThresholdAfter(p.athleteId, p.sport, p.metric, p.from, transaction!);
  const [row] = await db().query<{ sessions: number; blocks: number }>(
    `SELECT COUNT(DISTINCT s.id) AS sessions, COUNT(*) AS blocks ${SCOPE}`,
    {
      replacements: { ...p, until },
      type: QueryTypes.SELECT,
      transaction,
    },
  );
  return { sessions: Number(row.sessions), blocks: Number(row.blocks), until };
}

/** A few before → after examples: the most intense step of the first sessions in scope. */
export async function examplesFor(
  p: { athleteId: number; sport: string; metric: string; from: string; value: number; unit: string },
  transaction?: Transaction,
) {
  const until = await nextThresholdAfter(p.athleteId, p.sport, p.metric, p.from, transaction!);
  // The first three sessions in scope come off the (athlete, date) index; only their steps are ranked, read by
  // session id (led by the athlete's date index instead, the ranking walked the whole scope: 100 ms on 20k steps).
  // PostgreSQL wants the ORDER BY of a DISTINCT in its select list; a block's date is its session's date.
  const first = await db().query<{ id: number }>(
    `SELECT DISTINCT s.id, ${dialect() === "postgres" ? "b.date" : "s.date"} ${SCOPE} ORDER BY b.date LIMIT 3`,
    { replacements: { ...p, until }, type: QueryTypes.SELECT, transaction },
  );
  if (first.length === 0) return [];
  const rows = await db().query<{
    date: string;
    name: string;
    metric: string;
    low_pct: number;
    high_pct: number;
    low_abs: number | null;
    high_abs: number | null;
    unit: string | null;
    ramp: number;
    new_low: number;
    new_high: number;
  }>(
    `SELECT date, name, metric, low_pct, high_pct, low_abs, high_abs, unit, ramp, new_low, new_high FROM (
       SELECT s.date, s.name, b.metric, b.low_pct, b.high_pct, b.low_abs, b.high_abs, b.unit, b.ramp,
              ${RESOLVE("low_pct", "b.")} AS new_low,
              ${RESOLVE("high_pct", "b.")} AS new_high,
              ROW_NUMBER() OVER (PARTITION BY s.id ORDER BY b.high_pct DESC, b.position) AS rn
       FROM scheduled_blocks b JOIN scheduled_sessions s ON s.id = b.scheduled_session_id
       WHERE b.scheduled_session_id IN (:ids) AND ${SCOPE_CONDITIONS}) ranked WHERE rn = 1 ORDER BY date`,
    { replacements: { ...p, until, ids: first.map((f) => f.id) }, type: QueryTypes.SELECT, transaction },
  );
  return rows.map((r) => {
    const base = { metric: r.metric, lowPct: r.low_pct, highPct: r.high_pct, ramp: Boolean(r.ramp) };
    return {
      date: r.date,
      name: r.name,
      before: stepTarget({ ...base, lowAbs: r.low_abs, highAbs: r.high_abs, unit: r.unit }),
      after: stepTarget({ ...base, lowAbs: r.new_low, highAbs: r.new_high, unit: p.unit }),
    };
  });
}

/**
 * Saves a new threshold and rescales every step in scope with set-based SQL inside the caller's transaction: one
 * UPDATE recomputes the steps from their stored percentages and marks them with the new threshold's id, and each
 * touched session's feed sequence moves on. For the exact undo the report keeps the threshold the steps followed
 * before (rescale_undo_bases); only steps that did not hold exactly its numbers are copied (rescale_undo_steps).
 * Returns the report.
 */
export async function applyThreshold(
  p: {
    athleteId: number;
    sport: "bike" | "run" | "swim";
    metric: "power" | "heart_rate" | "pace";
    value: number;
    unit: string;
    from: string;
    fieldTestId: number | null;
    createdBy: number | null;
  },
  transaction: Transaction,
) {
  // An athlete has a handful of thresholds per metric: one read gives the latest (the report's "was"), the one in
  // force on the new one's first day (what the steps in scope follow now) and the next one after it (the scope's end).
  const history = await Threshold.findAll({
    where: { athleteId: p.athleteId, sport: p.sport, metric: p.metric },
    order: [
      ["effectiveFrom", "ASC"],
      ["id", "ASC"],
    ],
    transaction,
  });
  const previous = history.at(-1) ?? null;
  const inForce = history.findLast((t) => t.effectiveFrom <= p.from) ?? null;
  const until = history.find((t) => t.effectiveFrom > p.from)?.effectiveFrom ?? null;
  const examples = await examplesFor(p, transaction);
  const threshold = await Threshold.create(
    {
      athleteId: p.athleteId,
      sport: p.sport,
      metric: p.metric,
      value: p.value,
      unit: p.unit,
      effectiveFrom: p.from,
      source: p.fieldTestId ? "field_test" : "manual",
      fieldTestId: p.fieldTestId,
      createdBy: p.createdBy,
    },
    { transaction },
  );
  const report = await RescaleReport.create(
    {
      athleteId: p.athleteId,
      fieldTestId: p.fieldTestId,
      kind: "apply",
      sport: p.sport,
      metric: p.metric,
      oldValue: previous?.value ?? null,
      newValue: p.value,
      unit: p.unit,
      fromDate: p.from,
      sessionsChanged: 0,
      blocksChanged: 0,
      examples,
      createdBy: p.createdBy,
    },
    { transaction },
  );
  const replacements = {
    athleteId: p.athleteId,
    sport: p.sport,
    metric: p.metric,
    from: p.from,
    until,
    value: p.value,
    unit: p.unit,
    reportId: report.id,
    thresholdId: threshold.id,
    oldId: inForce?.id ?? null,
    oldValue: inForce?.value ?? null,
    oldUnit: inForce?.unit ?? null,
    now: sqlDate(new Date()),
  };
  await db().query(
    `INSERT INTO rescale_undo_bases (report_id, threshold_id, old_threshold_id, old_threshold_value, old_unit)
     VALUES (:reportId, :thresholdId, :oldId, :oldValue, :oldUnit)`,
    { replacements, transaction },
  );
  // The scope in the UPDATE's form below (its index, not a join per step to the sessions).
  const STEPS = `FROM scheduled_blocks b
     WHERE b.athlete_id = :athleteId AND b.sport = :sport AND b.metric = :metric AND b.low_pct IS NOT NULL
       AND b.date >= :from AND (:until IS NULL OR b.date < :until)
       AND b.scheduled_session_id NOT IN (SELECT id FROM scheduled_sessions WHERE athlete_id = :athleteId AND status <> 'planned')`;
  // Normally nothing: steps placed or moved under the old threshold hold its numbers. Steps that do not (stored by
  // hand, or left from before a threshold was set without a rescale) keep their own values for the undo.
  await db().query(
    `INSERT INTO rescale_undo_steps (report_id, block_id, scheduled_session_id, old_low_abs, old_high_abs, old_unit, old_threshold_id, old_threshold_value)
     SELECT :reportId, b.id, b.scheduled_session_id, b.low_abs, b.high_abs, b.unit, b.threshold_id, b.threshold_value ${STEPS}
       AND ${followsOld()} = 0`,
    { replacements, transaction },
  );
  const blocks = await db().query(
    // The same scope written for an UPDATE: the steps' own (athlete, date, metric) index drives it, and the few
    // sessions no longer planned are excluded by id. The new threshold id marks exactly the steps rewritten here
    // (the threshold is new), which the feed sequence below and the undo find through its index.
    `UPDATE scheduled_blocks SET low_abs = ${RESOLVE("low_pct")}, high_abs = ${RESOLVE("high_pct")}, unit = :unit, threshold_id = :thresholdId, threshold_value = :value
     WHERE athlete_id = :athleteId AND sport = :sport AND metric = :metric AND low_pct IS NOT NULL
       AND date >= :from AND (:until IS NULL OR date < :until)
       AND scheduled_session_id NOT IN (SELECT id FROM scheduled_sessions WHERE athlete_id = :athleteId AND status <> 'planned')`,
    { replacements, transaction, type: QueryTypes.BULKUPDATE },
  );
  const sessions = await db().query(
    `UPDATE scheduled_sessions SET feed_sequence = feed_sequence + 1, updated_at = :now
     WHERE id IN (SELECT scheduled_session_id FROM scheduled_blocks WHERE threshold_id = :thresholdId)`,
    { replacements, transaction, type: QueryTypes.BULKUPDATE },
  );
  await report.update({ sessionsChanged: Number(sessions), blocksChanged: Number(blocks) }, { transaction });
  return { report, threshold, previous };
}

/**
 * Undoes a rescale: every step it changed that is still planned gets back exactly the values it had, the threshold
 * is removed from the history, and an "undo" report records it.
 */
export async function undoRescale(
  applyReport: RescaleReport,
  threshold: Threshold | null,
  createdBy: number | null,
  transaction: Transaction,
) {
  const [base] = await db().query<{
    threshold_id: number;
    old_threshold_id: number | null;
    old_threshold_value: number | null;
    old_unit: string | null;
  }>(
    "SELECT threshold_id, old_threshold_id, old_threshold_value, old_unit FROM rescale_undo_bases WHERE report_id = ?",
    {
      replacements: [applyReport.id],
      type: QueryTypes.SELECT,
      transaction,
    },
  );
  const counts = base
    ? await undoFromBase(applyReport, base, transaction)
    : await undoFromCopies(applyReport, transaction);
  if (threshold) await threshold.destroy({ transaction });
  return RescaleReport.create(
    {
      athleteId: applyReport.athleteId,
      fieldTestId: applyReport.fieldTestId,
      kind: "undo",
      sport: applyReport.sport,
      metric: applyReport.metric,
      oldValue: applyReport.newValue,
      newValue: applyReport.oldValue,
      unit: applyReport.unit,
      fromDate: applyReport.fromDate,
      sessionsChanged: counts.sessions,
      blocksChanged: counts.blocks,
      createdBy,
    },
    { transaction },
  );
}

/**
 * The steps still marked with the rescale's threshold and still planned go back: those it copied to their copy, the
 * rest recomputed from the old threshold, by the same SQL that found they held its numbers. Done and skipped ones
 * keep what the athlete rode to.
 */
async function undoFromBase(
  applyReport: RescaleReport,
  base: {
    threshold_id: number;
    old_threshold_id: number | null;
    old_threshold_value: number | null;
    old_unit: string | null;
  },
  transaction: Transaction,
): Promise<ScopeCounts> {
  const replacements = {
    reportId: applyReport.id,
    athleteId: applyReport.athleteId,
    thresholdId: base.threshold_id,
    oldId: base.old_threshold_id,
    oldValue: base.old_threshold_value,
    oldUnit: base.old_unit,
    now: sqlDate(new Date()),
  };
  const PLANNED = "SELECT id FROM scheduled_sessions WHERE athlete_id = :athleteId AND status = 'planned'";
  const [counts] = await db().query<{ sessions: number; blocks: number }>(
    `SELECT COUNT(DISTINCT scheduled_session_id) AS sessions, COUNT(*) AS blocks FROM scheduled_blocks
     WHERE threshold_id = :thresholdId AND scheduled_session_id IN (${PLANNED})`,
    { replacements, type: QueryTypes.SELECT, transaction },
  );
  await db().query(
    `UPDATE scheduled_sessions SET feed_sequence = feed_sequence + 1, updated_at = :now
     WHERE status = 'planned' AND id IN (SELECT scheduled_session_id FROM scheduled_blocks WHERE threshold_id = :thresholdId)`,
    { replacements, transaction },
  );
  await db().query(
    `UPDATE scheduled_blocks SET low_abs = u.old_low_abs, high_abs = u.old_high_abs, unit = u.old_unit, threshold_id = u.old_threshold_id, threshold_value = u.old_threshold_value
     FROM rescale_undo_steps u
     WHERE u.report_id = :reportId AND u.block_id = scheduled_blocks.id AND scheduled_blocks.threshold_id = :thresholdId
       AND scheduled_blocks.scheduled_session_id IN (${PLANNED})`,
    { replacements, transaction },
  );
  await db().query(
    `UPDATE scheduled_blocks SET low_abs = ${RESOLVE("low_pct", "", ":oldValue")}, high_abs = ${RESOLVE("high_pct", "", ":oldValue")},
       unit = :oldUnit, threshold_id = :oldId, threshold_value = :oldValue
     WHERE threshold_id = :thresholdId AND scheduled_session_id IN (${PLANNED})`,
    { replacements, transaction },
  );
  return { sessions: Number(counts.sessions), blocks: Number(counts.blocks) };
}

/** Reports saved before rescale_undo_bases kept a copy of every step they changed. */
async function undoFromCopies(applyReport: RescaleReport, transaction: Transaction): Promise<ScopeCounts> {
  const replacements = { reportId: applyReport.id, now: sqlDate(new Date()) };
  // Only steps that still exist and are still planned get their old values back; done and skipped ones keep what
  // the athlete rode to.
  const STILL = `FROM rescale_undo_steps u JOIN scheduled_blocks b ON b.id = u.block_id JOIN scheduled_sessions s ON s.id = b.scheduled_session_id
     WHERE u.report_id = :reportId AND s.status = 'planned'`;
  const [counts] = await db().query<{ sessions: number; blocks: number }>(
    `SELECT COUNT(DISTINCT s.id) AS sessions, COUNT(*) AS blocks ${STILL}`,
    { replacements, type: QueryTypes.SELECT, transaction },
  );
  await db().query(
    `UPDATE scheduled_sessions SET feed_sequence = feed_sequence + 1, updated_at = :now
     WHERE status = 'planned' AND id IN (SELECT scheduled_session_id FROM rescale_undo_steps WHERE report_id = :reportId)`,
    { replacements, transaction },
  );
  await db().query(
    `UPDATE scheduled_blocks SET low_abs = u.old_low_abs, high_abs = u.old_high_abs, unit = u.old_unit, threshold_id = u.old_threshold_id, threshold_value = u.old_threshold_value
     FROM rescale_undo_steps u, scheduled_sessions s
     WHERE u.block_id = scheduled_blocks.id AND s.id = scheduled_blocks.scheduled_session_id AND u.report_id = :reportId AND s.status = 'planned'`,
    { replacements, transaction },
  );
  return { sessions: Number(counts.sessions), blocks: Number(counts.blocks) };
}
