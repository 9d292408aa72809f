import { DataTypes, type QueryInterface } from "sequelize";
import { dropInsertGuard, insertGuard } from "../portable";

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
  await qi.createTable("sessions", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    owner_id: fk("users"),
    name: { type: DataTypes.STRING(120), allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    tags: { type: DataTypes.TEXT, allowNull: false, defaultValue: "[]" },
    // A field-test protocol key when this session is a test (readiness screening applies), else null.
    test_protocol: { type: DataTypes.STRING(32), allowNull: true },
    archived: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    ...timestamps,
  });
  await qi.addIndex("sessions", ["owner_id", "archived"]);

  await qi.createTable("session_blocks", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    session_id: fk("sessions"),
    position: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING(16), allowNull: false },
    // The block as the training engine reads it (validated before it is written).
    spec: { type: DataTypes.TEXT, allowNull: false },
    ...timestamps,
  });
  await qi.addIndex("session_blocks", ["session_id", "position"], { unique: true });

  await qi.createTable("season_plans", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    owner_id: fk("users"),
    name: { type: DataTypes.STRING(120), allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    alignment: { type: DataTypes.STRING(8), allowNull: false },
    start_date: { type: DataTypes.DATEONLY, allowNull: true },
    event_date: { type: DataTypes.DATEONLY, allowNull: true },
    weekly_hours: { type: DataTypes.FLOAT, allowNull: false },
    pattern: { type: DataTypes.STRING(4), allowNull: false },
    test_every_weeks: { type: DataTypes.INTEGER, allowNull: false },
    // Bumped by every board change, so a move made on a stale board is refused.
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    ...timestamps,
  });
  await qi.addIndex("season_plans", ["owner_id"]);

  await qi.createTable("plan_weeks", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    plan_id: fk("season_plans"),
    idx: { type: DataTypes.INTEGER, allowNull: false },
    phase: { type: DataTypes.STRING(16), allowNull: false },
    recovery: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    test: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    load_factor: { type: DataTypes.FLOAT, allowNull: false },
    planned_hours: { type: DataTypes.FLOAT, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    ...timestamps,
  });
  await qi.addIndex("plan_weeks", ["plan_id", "idx"], { unique: true });

  await qi.createTable("plan_recurrences", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    plan_id: fk("season_plans"),
    source_session_id: fk("sessions", "SET NULL", true),
    rule: { type: DataTypes.STRING(255), allowNull: false },
    summary: { type: DataTypes.STRING(255), allowNull: false },
    ...timestamps,
  });

  await qi.createTable("plan_items", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    plan_id: fk("season_plans"),
    week_id: fk("plan_weeks"),
    day: { type: DataTypes.INTEGER, allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    // A copy of the session at the time it was placed: later shelf edits do not change a built plan.
    source_session_id: fk("sessions", "SET NULL", true),
    recurrence_id: fk("plan_recurrences", "SET NULL", true),
    name: { type: DataTypes.STRING(120), allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    test_protocol: { type: DataTypes.STRING(32), allowNull: true },
    blocks: { type: DataTypes.TEXT, allowNull: false },
    time_of_day: { type: DataTypes.STRING(5), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    ...timestamps,
  });
  await qi.addIndex("plan_items", ["week_id", "day", "position"], { unique: true });
  await qi.addIndex("plan_items", ["plan_id"]);
  await qi.addIndex("plan_items", ["source_session_id"]);
  await insertGuard(qi, "plan_items_day_check", "plan_items", "NEW.day NOT BETWEEN 0 AND 6", "day must be 0-6");
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await dropInsertGuard(qi, "plan_items_day_check", "plan_items");
  await qi.dropTable("plan_items");
  await qi.dropTable("plan_recurrences");
  await qi.dropTable("plan_weeks");
  await qi.dropTable("season_plans");
  await qi.dropTable("session_blocks");
  await qi.dropTable("sessions");
}
