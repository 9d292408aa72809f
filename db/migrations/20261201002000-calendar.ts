import { DataTypes, type QueryInterface } from "sequelize";

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};
const fk = (model: string, onDelete: "CASCADE" | "SET NULL" = "CASCADE", allowNull = false) => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model, key: "id" },
  onDelete,
});

export async function up({ context: qi }: { context: QueryInterface }) {
  // Threshold history: one row per change, effective from a date; the newest effective row is current.
  await qi.createTable("thresholds", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athlete_id: fk("users"),
    sport: { type: DataTypes.STRING(8), allowNull: false },
    metric: { type: DataTypes.STRING(16), allowNull: false },
    value: { type: DataTypes.FLOAT, allowNull: false },
    unit: { type: DataTypes.STRING(8), allowNull: false },
    effective_from: { type: DataTypes.DATEONLY, allowNull: false },
    source: { type: DataTypes.STRING(16), allowNull: false },
    field_test_id: { type: DataTypes.INTEGER, allowNull: true },
    created_by: fk("users", "SET NULL", true),
    ...timestamps,
  });
  await qi.addIndex("thresholds", ["athlete_id", "sport", "metric", "effective_from"]);

  await qi.createTable("assignments", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athlete_id: fk("users"),
    plan_id: fk("season_plans", "SET NULL", true),
    assigned_by: fk("users", "SET NULL", true),
    start_date: { type: DataTypes.DATEONLY, allowNull: false },
    plan_version: { type: DataTypes.INTEGER, allowNull: false },
    ...timestamps,
  });
  await qi.addIndex("assignments", ["plan_id"]);
  await qi.addIndex("assignments", ["athlete_id"]);

  await qi.createTable("scheduled_sessions", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athlete_id: fk("users"),
    assignment_id: fk("assignments", "SET NULL", true),
    plan_item_id: fk("plan_items", "SET NULL", true),
    date: { type: DataTypes.DATEONLY, allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    time_of_day: { type: DataTypes.STRING(5), allowNull: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    test_protocol: { type: DataTypes.STRING(32), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    planned_duration_s: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    planned_load: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 0 },
    status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: "planned" },
    effort_score: { type: DataTypes.INTEGER, allowNull: true },
    actual_minutes: { type: DataTypes.FLOAT, allowNull: true },
    comment: { type: DataTypes.TEXT, allowNull: true },
    completed_at: { type: DataTypes.DATE, allowNull: true },
    cancelled_at: { type: DataTypes.DATE, allowNull: true },
    // iCalendar SEQUENCE: rises with every change a subscribed calendar must pick up.
    feed_sequence: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    upload_id: { type: DataTypes.INTEGER, allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("scheduled_sessions", ["athlete_id", "date"]);
  await qi.addIndex("scheduled_sessions", ["assignment_id"]);

  // One row per step (repeats unrolled), keeping the % target, the absolute target and the threshold it came from.
  await qi.createTable("scheduled_blocks", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    scheduled_session_id: fk("scheduled_sessions"),
    athlete_id: { type: DataTypes.INTEGER, allowNull: false },
    date: { type: DataTypes.DATEONLY, allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    block_index: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING(16), allowNull: false },
    part: { type: DataTypes.STRING(10), allowNull: false },
    rep: { type: DataTypes.INTEGER, allowNull: true },
    rep_count: { type: DataTypes.INTEGER, allowNull: true },
    duration_s: { type: DataTypes.INTEGER, allowNull: false },
    metric: { type: DataTypes.STRING(16), allowNull: true },
    low_pct: { type: DataTypes.FLOAT, allowNull: true },
    high_pct: { type: DataTypes.FLOAT, allowNull: true },
    ramp: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    low_abs: { type: DataTypes.INTEGER, allowNull: true },
    high_abs: { type: DataTypes.INTEGER, allowNull: true },
    unit: { type: DataTypes.STRING(8), allowNull: true },
    threshold_id: fk("thresholds", "SET NULL", true),
    threshold_value: { type: DataTypes.FLOAT, allowNull: true },
    cue: { type: DataTypes.STRING(200), allowNull: true },
    cadence: { type: DataTypes.INTEGER, allowNull: true },
  });
  await qi.addIndex("scheduled_blocks", ["scheduled_session_id", "position"], { unique: true });
  await qi.addIndex("scheduled_blocks", ["athlete_id", "date", "metric"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("scheduled_blocks");
  await qi.dropTable("scheduled_sessions");
  await qi.dropTable("assignments");
  await qi.dropTable("thresholds");
}
