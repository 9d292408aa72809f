import { DataTypes, type QueryInterface } from "sequelize";
import { dropColumn } from "../portable";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("feed_tokens", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    user_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    // 32 random bytes; the link's token is an HMAC of them under the server secret, and only its SHA-256 is looked up.
    salt: { type: DataTypes.STRING(64), allowNull: false },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    revoked_at: { type: DataTypes.DATE, allowNull: true },
    last_used_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("feed_tokens", ["user_id"]);
  // Minutes before a timed session for a calendar reminder; null for none.
  await qi.addColumn("users", "feed_alarm_minutes", { type: DataTypes.INTEGER, allowNull: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await dropColumn(qi, "users", "feed_alarm_minutes");
  await qi.dropTable("feed_tokens");
}
