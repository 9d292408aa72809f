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
const RESOLVE = (col: "low_pct" | "high_pct", table = "") => {
  if (dialect() === "postgres") {
    const value = "CAST(:value AS DOUBLE PRECISION)";
    const pct = `CAST(${table}${col} AS DOUBLE PRECISION)`;
    const hundred = "CAST(100 AS DOUBLE PRECISION)";
    return `CASE WHEN ${table}metric = 'pace' THEN CAST(FLOOR(${value} / (${pct} / ${hundred}) + 0.5) AS INTEGER) ELSE CAST(FLOOR(${pct} * ${value} / ${hundred} + 0.5) AS INTEGER) END`;
  }
  return `CASE WHEN ${table}metric = 'pace' THEN CAST(ROUND(:value / (${table}${col} / 100.0)) AS INTEGER) ELSE CAST(ROUND(${table}${col} * :value / 100.0) AS INTEGER) END`;
};

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
 * Saves a new threshold and rescales every step in scope with set-based SQL inside the caller's transaction: the
 * old values are copied to rescale_undo_steps (for an exact undo), the steps are recomputed from their stored
 * percentages, and each touched session's feed sequence moves on. Returns the report.
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
  const previous = await Threshold.findOne({
    where: { athleteId: p.athleteId, sport: p.sport, metric: p.metric },
    order: [
      ["effectiveFrom", "DESC"],
      ["id", "DESC"],
    ],
    transaction,
  });
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
  const until = await nextThresholdAfter(p.athleteId, p.sport, p.metric, p.from, transaction);
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
    now: sqlDate(new Date()),
  };
  // Three set-based statements over the steps in scope: copy their old values (clustered on the report, so the copy
  // costs about what the update does), recompute them from their percentages, move their sessions' feed sequence on.
  await db().query(
    `INSERT INTO rescale_undo_steps (report_id, block_id, scheduled_session_id, old_low_abs, old_high_abs, old_unit, old_threshold_id, old_threshold_value)
     SELECT :reportId, b.id, b.scheduled_session_id, b.low_abs, b.high_abs, b.unit, b.threshold_id, b.threshold_value ${SCOPE}`,
    { replacements, transaction },
  );
  await db().query(
    // The same scope written for an UPDATE: the steps' own (athlete, date, metric) index drives it, and the few
    // sessions no longer planned are excluded by id (going through the copied ids instead was 2–4× slower).
    `UPDATE scheduled_blocks SET low_abs = ${RESOLVE("low_pct")}, high_abs = ${RESOLVE("high_pct")}, unit = :unit, threshold_id = :thresholdId, threshold_value = :value
     WHERE athlete_id = :athleteId AND sport = :sport AND metric = :metric AND low_pct IS NOT NULL
       AND date >= :from AND (:until IS NULL OR date < :until)
       AND scheduled_session_id NOT IN (SELECT id FROM scheduled_sessions WHERE athlete_id = :athleteId AND status <> 'planned')`,
    { replacements, transaction },
  );
  await db().query(
    `UPDATE scheduled_sessions SET feed_sequence = feed_sequence + 1, updated_at = :now
     WHERE id IN (SELECT scheduled_session_id FROM rescale_undo_steps WHERE report_id = :reportId)`,
    { replacements, transaction },
  );
  const [counts] = await db().query<{ sessions: number; blocks: number }>(
    "SELECT COUNT(DISTINCT scheduled_session_id) AS sessions, COUNT(*) AS blocks FROM rescale_undo_steps WHERE report_id = :reportId",
    { replacements, type: QueryTypes.SELECT, transaction },
  );
  await report.update(
    { sessionsChanged: Number(counts.sessions), blocksChanged: Number(counts.blocks) },
    { transaction },
  );
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
  const replacements = { reportId: applyReport.id, now: sqlDate(new Date()) };
  // Only steps that still exist and are still planned get their old values back; done and skipped ones keep what
  // the athlete rode to.
  const STILL = `FROM rescale_undo_steps u JOIN scheduled_blocks b ON b.id = u.block_id JOIN scheduled_sessions s ON s.id = b.scheduled_session_id
     WHERE u.report_id = :reportId AND s.status = 'planned'`;
  const [counts] = await db().query<{ sessions: number; blocks: number }>(
    `SELECT COUNT(DISTINCT s.id) AS sessions, COUNT(*) AS blocks ${STILL}`,
    {
      replacements,
      type: QueryTypes.SELECT,
      transaction,
    },
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
      sessionsChanged: Number(counts.sessions),
      blocksChanged: Number(counts.blocks),
      createdBy,
    },
    { transaction },
  );
}
