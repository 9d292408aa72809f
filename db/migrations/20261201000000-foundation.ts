import { DataTypes, type QueryInterface } from "sequelize";
import { caseInsensitiveText, dropInsertGuard, insertGuard, isPostgres, uniqueLower } from "../portable";

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("users", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    role: { type: DataTypes.STRING(16), allowNull: false },
    // Stored lower-cased; NOCASE (SQLite) or a lower() unique index (PostgreSQL) keeps it unique whatever the case,
    // even for rows written by hand.
    email: { type: caseInsensitiveText(qi), allowNull: false, unique: !isPostgres(qi) },
    password_hash: { type: DataTypes.STRING, allowNull: false },
    name: { type: DataTypes.STRING(120), allowNull: false },
    timezone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: "UTC" },
    units: { type: DataTypes.STRING(16), allowNull: false, defaultValue: "metric" },
    sex: { type: DataTypes.STRING(8), allowNull: true },
    weight_kg: { type: DataTypes.FLOAT, allowNull: true },
    resting_hr: { type: DataTypes.INTEGER, allowNull: true },
    max_hr: { type: DataTypes.INTEGER, allowNull: true },
    ...timestamps,
  });
  await uniqueLower(qi, "users", "email");
  await insertGuard(qi, "users_role_check", "users", "NEW.role NOT IN ('admin','coach','athlete')", "invalid role");

  await qi.createTable("auth_sessions", {
    // SHA-256 of the cookie's random id: a copied database does not hand out live sessions.
    id: { type: DataTypes.STRING(64), primaryKey: true },
    user_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    user_agent: { type: DataTypes.STRING(255), allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("auth_sessions", ["user_id"]);

  await qi.createTable("coach_athletes", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    coach_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    athlete_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    ...timestamps,
  });
  await qi.addIndex("coach_athletes", ["coach_id", "athlete_id"], { unique: true });
  await qi.addIndex("coach_athletes", ["athlete_id"]);

  await qi.createTable("invitations", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    coach_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    email: { type: caseInsensitiveText(qi), allowNull: false },
    name: { type: DataTypes.STRING(120), allowNull: true },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    accepted_at: { type: DataTypes.DATE, allowNull: true },
    accepted_user_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: "users", key: "id" },
      onDelete: "SET NULL",
    },
    ...timestamps,
  });
  await qi.addIndex("invitations", ["coach_id"]);

  await qi.createTable("password_resets", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    user_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    used_at: { type: DataTypes.DATE, allowNull: true },
    ...timestamps,
  });

  await qi.createTable("outbound_emails", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    to_address: { type: DataTypes.STRING(320), allowNull: false },
    subject: { type: DataTypes.STRING(255), allowNull: false },
    template: { type: DataTypes.STRING(64), allowNull: false },
    text_body: { type: DataTypes.TEXT, allowNull: false },
    html_body: { type: DataTypes.TEXT, allowNull: false },
    status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: "pending" },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    next_attempt_at: { type: DataTypes.DATE, allowNull: false },
    last_error: { type: DataTypes.TEXT, allowNull: true },
    message_id: { type: DataTypes.STRING(255), allowNull: true },
    sent_at: { type: DataTypes.DATE, allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("outbound_emails", ["status", "next_attempt_at"]);

  await qi.createTable("login_failures", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    email: { type: caseInsensitiveText(qi), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("login_failures", ["email", "created_at"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("login_failures");
  await qi.dropTable("outbound_emails");
  await qi.dropTable("password_resets");
  await qi.dropTable("invitations");
  await qi.dropTable("coach_athletes");
  await qi.dropTable("auth_sessions");
  await dropInsertGuard(qi, "users_role_check", "users");
  await qi.dropTable("users");
}
