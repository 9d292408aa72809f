import { DataTypes, type QueryInterface } from "sequelize";

const fk = (model: string, onDelete: "CASCADE" | "SET NULL" = "CASCADE", allowNull = false) => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model, key: "id" },
  onDelete,
});
const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("uploads", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athlete_id: fk("users"),
    uploaded_by: fk("users", "SET NULL", true),
    kind: { type: DataTypes.STRING(16), allowNull: false, defaultValue: "activity" },
    original_name: { type: DataTypes.STRING(255), allowNull: false },
    format: { type: DataTypes.STRING(8), allowNull: false },
    size: { type: DataTypes.INTEGER, allowNull: false },
    storage_key: { type: DataTypes.STRING(255), allowNull: false, unique: true },
    // What the engine found in the file: duration, channels, best efforts, power curve, work, detected ramp.
    summary: { type: DataTypes.TEXT, allowNull: false },
    ...timestamps,
  });
  await qi.addIndex("uploads", ["athlete_id", "created_at"]);

  await qi.createTable("field_tests", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athlete_id: fk("users"),
    protocol: { type: DataTypes.STRING(32), allowNull: false },
    sport: { type: DataTypes.STRING(8), allowNull: false },
    metric: { type: DataTypes.STRING(16), allowNull: false },
    inputs: { type: DataTypes.TEXT, allowNull: false },
    derived: { type: DataTypes.TEXT, allowNull: false },
    value: { type: DataTypes.FLOAT, allowNull: false },
    unit: { type: DataTypes.STRING(8), allowNull: false },
    tested_on: { type: DataTypes.DATEONLY, allowNull: false },
    upload_id: fk("uploads", "SET NULL", true),
    threshold_id: fk("thresholds", "SET NULL", true),
    readiness: { type: DataTypes.TEXT, allowNull: true },
    status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: "active" },
    undone_at: { type: DataTypes.DATE, allowNull: true },
    // A client-made key per submission: a double submit finds the first test instead of rescaling twice.
    request_key: { type: DataTypes.STRING(64), allowNull: true, unique: true },
    created_by: fk("users", "SET NULL", true),
    ...timestamps,
  });
  await qi.addIndex("field_tests", ["athlete_id", "tested_on"]);

  await qi.createTable("rescale_reports", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athlete_id: fk("users"),
    field_test_id: fk("field_tests", "SET NULL", true),
    kind: { type: DataTypes.STRING(8), allowNull: false },
    sport: { type: DataTypes.STRING(8), allowNull: false },
    metric: { type: DataTypes.STRING(16), allowNull: false },
    old_value: { type: DataTypes.FLOAT, allowNull: true },
    new_value: { type: DataTypes.FLOAT, allowNull: true },
    unit: { type: DataTypes.STRING(8), allowNull: false },
    from_date: { type: DataTypes.DATEONLY, allowNull: false },
    sessions_changed: { type: DataTypes.INTEGER, allowNull: false },
    blocks_changed: { type: DataTypes.INTEGER, allowNull: false },
    examples: { type: DataTypes.TEXT, allowNull: false, defaultValue: "[]" },
    created_by: fk("users", "SET NULL", true),
    ...timestamps,
  });
  await qi.addIndex("rescale_reports", ["athlete_id"]);

  // The values each rescale replaced, so undo restores them exactly.
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
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("rescale_changes");
  await qi.dropTable("rescale_reports");
  await qi.dropTable("field_tests");
  await qi.dropTable("uploads");
}
