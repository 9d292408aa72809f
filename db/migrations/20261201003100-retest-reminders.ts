import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  // One reminder per athlete and due date, however often the daily job runs.
  await qi.createTable("retest_reminders", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athlete_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    due_date: { type: DataTypes.DATEONLY, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("retest_reminders", ["athlete_id", "due_date"], { unique: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("retest_reminders");
}
