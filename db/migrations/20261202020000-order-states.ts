import { DataTypes, type QueryInterface } from "sequelize";
import { dropColumn } from "../portable";

/**
 * Orders become one explicit state machine (see app/.server/services/orders.ts): the facts the provider reported
 * are kept on the order so that events can arrive in any order; listings gain cover text and can be edited.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("orders", "paid_cents", { type: DataTypes.INTEGER, allowNull: true });
  await qi.addColumn("orders", "paid_currency", { type: DataTypes.STRING(3), allowNull: true });
  await qi.addColumn("orders", "paid_at", { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn("orders", "expired_at", { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn("orders", "declined_count", { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await qi.addColumn("orders", "refunded_cents", { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  await qi.addColumn("orders", "refunds", { type: DataTypes.TEXT, allowNull: false, defaultValue: "{}" });
  await qi.addColumn("orders", "refund_requested_at", { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn("orders", "review_reason", { type: DataTypes.TEXT, allowNull: true });
  await qi.addColumn("orders", "receipt_sent_at", { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn("orders", "refund_notice_sent_at", { type: DataTypes.DATE, allowNull: true });
  await qi.addColumn("orders", "return_origin", { type: DataTypes.STRING(255), allowNull: true });
  await qi.addColumn("listings", "cover_text", { type: DataTypes.STRING(200), allowNull: true });
  // The column's database default stays 'pending' (SQLite cannot change a default in place); the model writes
  // 'created' on every insert. Old names onto the machine's states; facts that the old columns imply are carried over.
  await qi.sequelize.query("UPDATE orders SET status = 'created' WHERE status = 'pending'");
  await qi.sequelize.query("UPDATE orders SET status = 'expired', expired_at = updated_at WHERE status = 'cancelled'");
  await qi.sequelize.query(
    "UPDATE orders SET status = 'needs_review', review_reason = COALESCE(note, 'Flagged before the review queue existed.') WHERE status = 'flagged'",
  );
  await qi.sequelize.query("UPDATE orders SET declined_count = 1 WHERE status = 'declined'");
  await qi.sequelize.query(
    "UPDATE orders SET paid_cents = amount_cents, paid_currency = currency, paid_at = updated_at, receipt_sent_at = updated_at WHERE status IN ('fulfilled', 'refunded')",
  );
  await qi.sequelize.query(
    "UPDATE orders SET refunded_cents = amount_cents, refund_notice_sent_at = updated_at WHERE status = 'refunded'",
  );
  await qi.addIndex("orders", ["status"]);
  await qi.addIndex("orders", ["payment_intent_id"]);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeIndex("orders", ["payment_intent_id"]);
  await qi.removeIndex("orders", ["status"]);
  await qi.sequelize.query("UPDATE orders SET status = 'pending' WHERE status = 'created'");
  await qi.sequelize.query("UPDATE orders SET status = 'cancelled' WHERE status = 'expired'");
  await qi.sequelize.query(
    "UPDATE orders SET status = 'flagged', note = COALESCE(review_reason, note) WHERE status = 'needs_review'",
  );
  for (const c of [
    "paid_cents",
    "paid_currency",
    "paid_at",
    "expired_at",
    "declined_count",
    "refunded_cents",
    "refunds",
    "refund_requested_at",
    "review_reason",
    "receipt_sent_at",
    "refund_notice_sent_at",
    "return_origin",
  ])
    await dropColumn(qi, "orders", c);
  await dropColumn(qi, "listings", "cover_text");
}
