import { DataTypes, type QueryInterface } from "sequelize";

/**
 * The values a rescale replaced, kept for its exact undo, move to a table clustered on (report, step): on SQLite a
 * WITHOUT ROWID table, so each copied step is one b-tree write instead of a row plus two indexes plus two foreign-key
 * probes. Copying 20,000 steps then costs about what updating them does. The step and its session are kept as plain
 * ids: a step deleted later (a plan push rewrites its steps) simply has nothing left to restore, and ids are never
 * reused (AUTOINCREMENT on SQLite, sequences on PostgreSQL).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sequelize = qi.sequelize;
  if (sequelize.getDialect() === "sqlite") {
    await sequelize.query(`CREATE TABLE rescale_undo_steps (
      report_id INTEGER NOT NULL REFERENCES rescale_reports (id) ON DELETE CASCADE,
      block_id INTEGER NOT NULL,
      scheduled_session_id INTEGER NOT NULL,
      old_low_abs INTEGER, old_high_abs INTEGER, old_unit VARCHAR(8), old_threshold_id INTEGER, old_threshold_value FLOAT,
      PRIMARY KEY (report_id, block_id)
    ) WITHOUT ROWID`);
  } else {
    await qi.createTable("rescale_undo_steps", {
      report_id: {
        type: DataTypes.INTEGER,
        primaryKey: true,
        allowNull: false,
        references: { model: "rescale_reports", key: "id" },
        onDelete: "CASCADE",
      },
      block_id: { type: DataTypes.INTEGER, primaryKey: true, allowNull: false },
      scheduled_session_id: { type: DataTypes.INTEGER, allowNull: false },
      old_low_abs: { type: DataTypes.INTEGER, allowNull: true },
      old_high_abs: { type: DataTypes.INTEGER, allowNull: true },
      old_unit: { type: DataTypes.STRING(8), allowNull: true },
      old_threshold_id: { type: DataTypes.INTEGER, allowNull: true },
      old_threshold_value: { type: DataTypes.FLOAT, allowNull: true },
    });
  }
  await sequelize.query(
    `INSERT INTO rescale_undo_steps (report_id, block_id, scheduled_session_id, old_low_abs, old_high_abs, old_unit, old_threshold_id, old_threshold_value)
     SELECT c.report_id, c.block_id, b.scheduled_session_id, c.old_low_abs, c.old_high_abs, c.old_unit, c.old_threshold_id, c.old_threshold_value
     FROM rescale_changes c JOIN scheduled_blocks b ON b.id = c.block_id`,
  );
  await qi.dropTable("rescale_changes");
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const fk = (model: string) => ({
    type: DataTypes.INTEGER,
    allowNull: false,
    references: { model, key: "id" },
    onDelete: "CASCADE",
  });
  await qi.createTable("rescale_changes", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    report_id: fk("rescale_reports"),
    block_id: fk("scheduled_blocks"),
    old_low_abs: { type: DataTypes.INTEGER, allowNull: true },
    old_high_abs: { type: DataTypes.INTEGER, allowNull: true },
    old_unit: { type: DataTypes.STRING(8), allowNull: true },
    old_threshold_id: { type: DataTypes.INTEGER, allowNull: true },
    old_threshold_value: { type: DataTypes.FLOAT, allowNull: true },
  });
  await qi.addIndex("rescale_changes", ["report_id"]);
  await qi.addIndex("rescale_changes", ["block_id"]);
  await qi.sequelize.query(
    `INSERT INTO rescale_changes (report_id, block_id, old_low_abs, old_high_abs, old_unit, old_threshold_id, old_threshold_value)
     SELECT u.report_id, u.block_id, u.old_low_abs, u.old_high_abs, u.old_unit, u.old_threshold_id, u.old_threshold_value
     FROM rescale_undo_steps u JOIN scheduled_blocks b ON b.id = u.block_id`,
  );
  await qi.dropTable("rescale_undo_steps");
}
