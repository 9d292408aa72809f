import { DataTypes, type QueryInterface } from "sequelize";
import { dropColumn } from "../portable";

export async function up({ context: qi }: { context: QueryInterface }) {
  // When a signed-in device last made a request (updated at most every few minutes), for the devices list.
  await qi.addColumn("auth_sessions", "last_seen_at", { type: DataTypes.DATE, allowNull: true });
  // Two-step sign-in: the base32 TOTP secret (set at enrolment, confirmed once `totp_enabled_at` is set) and the
  // last time step accepted, so one code cannot be used twice.
  await qi.addColumn("users", "totp_secret", { type: DataTypes.STRING(64), allowNull: true });
  await qi.addColumn("users", "totp_enabled_at", { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn("users", "totp_last_step", { type: DataTypes.INTEGER, allowNull: true });
  await qi.createTable("recovery_codes", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    user_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    // SHA-256 of the code; the code itself is shown once.
    code_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    used_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("recovery_codes", ["user_id"]);
  // Studio-wide settings an admin changes (one row per setting).
  await qi.createTable("studio_settings", {
    key: { type: DataTypes.STRING(64), primaryKey: true },
    value: { type: DataTypes.TEXT, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("studio_settings");
  await qi.dropTable("recovery_codes");
  await dropColumn(qi, "users", "totp_last_step");
  await dropColumn(qi, "users", "totp_enabled_at");
  await dropColumn(qi, "users", "totp_secret");
  await dropColumn(qi, "auth_sessions", "last_seen_at");
}
