import { DataTypes, type QueryInterface } from "sequelize";

/**
 * A rescale no longer copies every step it rewrites: each target is pct × threshold / 100 (or threshold ÷ pct for
 * pace), computed by the same SQL both ways, so the undo recomputes a step from the threshold it had before. The
 * apply keeps one row per report here (the new threshold whose id marks the rewritten steps, and the old threshold
 * the undo recomputes from); only steps whose stored values did not follow that old threshold still go to
 * rescale_undo_steps. Reports from before keep their full copies and no row here. Threshold ids are plain ids: the
 * new threshold is deleted by the undo itself.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("rescale_undo_bases", {
    report_id: {
      type: DataTypes.INTEGER,
      primaryKey: true,
      allowNull: false,
      references: { model: "rescale_reports", key: "id" },
      onDelete: "CASCADE",
    },
    threshold_id: { type: DataTypes.INTEGER, allowNull: false },
    old_threshold_id: { type: DataTypes.INTEGER, allowNull: true },
    old_threshold_value: { type: DataTypes.FLOAT, allowNull: true },
    old_unit: { type: DataTypes.STRING(8), allowNull: true },
  });
}

/** The rescale SQL as it stands in this migration (see app/.server/services/rescale.ts for why it is written so). */
function resolve(postgres: boolean, col: "low_pct" | "high_pct") {
  if (postgres) {
    const value = "CAST(u.old_threshold_value AS DOUBLE PRECISION)";
    const pct = `CAST(b.${col} AS DOUBLE PRECISION)`;
    const hundred = "CAST(100 AS DOUBLE PRECISION)";
    return `CASE WHEN b.metric = 'pace' THEN CAST(FLOOR(${value} / (${pct} / ${hundred}) + 0.5) AS INTEGER) ELSE CAST(FLOOR(${pct} * ${value} / ${hundred} + 0.5) AS INTEGER) END`;
  }
  return `CASE WHEN b.metric = 'pace' THEN CAST(ROUND(u.old_threshold_value / (b.${col} / 100.0)) AS INTEGER) ELSE CAST(ROUND(b.${col} * u.old_threshold_value / 100.0) AS INTEGER) END`;
}

/**
 * The earlier code undoes from full copies only, so every step a kept report would recompute is written out as the
 * copy it used to make: the steps still marked with the report's threshold, with the values recomputed from the old
 * one (NULL throughout when there was none).
 */
export async function down({ context: qi }: { context: QueryInterface }) {
  const postgres = qi.sequelize.getDialect() === "postgres";
  await qi.sequelize.query(
    `INSERT INTO rescale_undo_steps (report_id, block_id, scheduled_session_id, old_low_abs, old_high_abs, old_unit, old_threshold_id, old_threshold_value)
     SELECT u.report_id, b.id, b.scheduled_session_id, ${resolve(postgres, "low_pct")}, ${resolve(postgres, "high_pct")}, u.old_unit, u.old_threshold_id, u.old_threshold_value
     FROM rescale_undo_bases u JOIN scheduled_blocks b ON b.threshold_id = u.threshold_id
     WHERE NOT EXISTS (SELECT 1 FROM rescale_undo_steps c WHERE c.report_id = u.report_id AND c.block_id = b.id)`,
  );
  await qi.dropTable("rescale_undo_bases");
}
