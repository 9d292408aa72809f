import { DataTypes, type QueryInterface } from "sequelize";
import { dropColumn } from "../portable";

/**
 * The shelf session's description travels with each placed copy; a thread of comments per scheduled session; an
 * athlete's usual training time per weekday (JSON array of seven "HH:MM" or null) for timed feed events.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("users", "training_times", { type: DataTypes.TEXT, allowNull: true });
  await qi.addColumn("plan_items", "description", { type: DataTypes.TEXT, allowNull: false, defaultValue: "" });
  await qi.addColumn("scheduled_sessions", "description", { type: DataTypes.TEXT, allowNull: false, defaultValue: "" });
  await qi.sequelize.query(
    "UPDATE plan_items SET description = COALESCE((SELECT s.description FROM sessions s WHERE s.id = plan_items.source_session_id), '')",
  );
  await qi.sequelize.query(
    "UPDATE scheduled_sessions SET description = COALESCE((SELECT p.description FROM plan_items p WHERE p.id = scheduled_sessions.plan_item_id), '')",
  );
  await qi.createTable("session_comments", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    scheduled_session_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "scheduled_sessions", key: "id" },
      onDelete: "CASCADE",
    },
    author_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    body: { type: DataTypes.TEXT, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("session_comments", ["scheduled_session_id", "created_at"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("session_comments");
  await dropColumn(qi, "scheduled_sessions", "description");
  await dropColumn(qi, "plan_items", "description");
  await dropColumn(qi, "users", "training_times");
}
