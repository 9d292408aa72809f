import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  // A coach's own split of a test's pacing plan (JSON array of % of expected power); null = the default split.
  await qi.addColumn("scheduled_sessions", "pacing_split", { type: DataTypes.TEXT, allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn("scheduled_sessions", "pacing_split");
}
