import { DataTypes, type QueryInterface } from "sequelize";
import { caseInsensitiveText } from "../portable";

export async function up({ context: qi }: { context: QueryInterface }) {
  // Counters for rate limits, shared by every app process that uses this database. One row per limiter key;
  // `expire` is epoch milliseconds so the same upsert runs on SQLite and PostgreSQL.
  await qi.createTable("rate_limits", {
    key: { type: DataTypes.STRING(255), primaryKey: true },
    points: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    expire: { type: DataTypes.BIGINT, allowNull: true },
  });
  await qi.addIndex("rate_limits", ["expire"]);
  // Sign-in failures are now counted in rate_limits, atomically, before the password is checked.
  await qi.dropTable("login_failures");
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("login_failures", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    email: { type: caseInsensitiveText(qi), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("login_failures", ["email", "created_at"]);
  await qi.dropTable("rate_limits");
}
