import { DataTypes, type QueryInterface } from "sequelize";
import { dropColumn } from "../portable";

export async function up({ context: qi }: { context: QueryInterface }) {
  // What a ride file told us about a done session: mechanical work, heart-rate load and minutes per power level.
  await qi.addColumn("scheduled_sessions", "work_kj", { type: DataTypes.FLOAT, allowNull: true });
  await qi.addColumn("scheduled_sessions", "trimp", { type: DataTypes.FLOAT, allowNull: true });
  await qi.addColumn("scheduled_sessions", "zone_minutes", { type: DataTypes.TEXT, allowNull: true });
  await qi.addIndex("scheduled_sessions", ["athlete_id", "status", "date"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeIndex("scheduled_sessions", ["athlete_id", "status", "date"]);
  await dropColumn(qi, "scheduled_sessions", "zone_minutes");
  await dropColumn(qi, "scheduled_sessions", "trimp");
  await dropColumn(qi, "scheduled_sessions", "work_kj");
}
