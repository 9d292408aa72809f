import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  // Background work claimed from the database by whichever app instance gets to it first (see app/.server/jobs.ts).
  await qi.createTable("jobs", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    kind: { type: DataTypes.STRING(32), allowNull: false },
    // One row per piece of work ("order:12:place"): a repeated cause finds the row already there.
    job_key: { type: DataTypes.STRING(128), allowNull: false, unique: true },
    order_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: "orders", key: "id" },
      onDelete: "CASCADE",
    },
    status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: "pending" },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    next_attempt_at: { type: DataTypes.DATE, allowNull: false },
    last_error: { type: DataTypes.TEXT, allowNull: true },
    done_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("jobs", ["order_id"]);
  await qi.addIndex("jobs", ["status", "next_attempt_at"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("jobs");
}
