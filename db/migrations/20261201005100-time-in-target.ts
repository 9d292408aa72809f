import { DataTypes, type QueryInterface } from "sequelize";
import { dropColumn } from "../portable";

export async function up({ context: qi }: { context: QueryInterface }) {
  // From an attached ride file: seconds of power-targeted steps, and how many of them were ridden within target.
  await qi.addColumn("scheduled_sessions", "targeted_s", { type: DataTypes.INTEGER, allowNull: true });
  await qi.addColumn("scheduled_sessions", "in_target_s", { type: DataTypes.INTEGER, allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await dropColumn(qi, "scheduled_sessions", "in_target_s");
  await dropColumn(qi, "scheduled_sessions", "targeted_s");
}
