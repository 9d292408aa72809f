import { DataTypes, type QueryInterface } from "sequelize";
import { dropColumn } from "../portable";

export async function up({ context: qi }: { context: QueryInterface }) {
  // A coach's own split of a test's pacing plan (JSON array of % of expected power); null = the default split.
  await qi.addColumn("scheduled_sessions", "pacing_split", { type: DataTypes.TEXT, allowNull: true });
  // Which field tests a threshold came from when a cross-check chose it (JSON array of ids); null = fieldTestId alone.
  await qi.addColumn("thresholds", "source_tests", { type: DataTypes.TEXT, allowNull: true });
  // Laps a user marked on a ride, with an effort score per lap (JSON); null = the file's own laps, if any.
  await qi.addColumn("uploads", "laps", { type: DataTypes.TEXT, allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await dropColumn(qi, "uploads", "laps");
  await dropColumn(qi, "thresholds", "source_tests");
  await dropColumn(qi, "scheduled_sessions", "pacing_split");
}
