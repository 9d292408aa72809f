import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { jsonColumn, timestamps as ts } from "./columns";

/** The order state machine's states; the transitions live in services/orders.ts. */
export type OrderStatus = "created" | "declined" | "fulfilled" | "expired" | "refunded" | "needs_review";

export class Order extends Model<InferAttributes<Order>, InferCreationAttributes<Order>> {
  declare id: CreationOptional<number>;
  declare listingId: number;
  declare buyerId: number;
  declare status: CreationOptional<OrderStatus>;
  declare amountCents: number;
  declare currency: string;
  declare alignMode: "start" | "event";
  declare alignDate: string;
  declare checkoutSessionId: CreationOptional<string | null>;
  declare paymentIntentId: CreationOptional<string | null>;
  declare assignmentId: CreationOptional<number | null>;
  declare note: CreationOptional<string | null>;
  declare paidCents: CreationOptional<number | null>;
  declare paidCurrency: CreationOptional<string | null>;
  declare paidAt: CreationOptional<Date | null>;
  declare expiredAt: CreationOptional<Date | null>;
  declare declinedCount: CreationOptional<number>;
  declare refundedCents: CreationOptional<number>;
  /** Refund id → amount in cents, as the provider reported them. */
  declare refunds: CreationOptional<Record<string, number>>;
  declare refundRequestedAt: CreationOptional<Date | null>;
  declare reviewReason: CreationOptional<string | null>;
  declare receiptSentAt: CreationOptional<Date | null>;
  declare refundNoticeSentAt: CreationOptional<Date | null>;
  declare returnOrigin: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
Order.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    listingId: { type: DataTypes.INTEGER, allowNull: false },
    buyerId: { type: DataTypes.INTEGER, allowNull: false },
    status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: "created" },
    amountCents: { type: DataTypes.INTEGER, allowNull: false },
    currency: { type: DataTypes.STRING(3), allowNull: false },
    alignMode: { type: DataTypes.STRING(8), allowNull: false },
    alignDate: { type: DataTypes.DATEONLY, allowNull: false },
    checkoutSessionId: { type: DataTypes.STRING(255), allowNull: true },
    paymentIntentId: { type: DataTypes.STRING(255), allowNull: true },
    assignmentId: { type: DataTypes.INTEGER, allowNull: true },
    note: { type: DataTypes.TEXT, allowNull: true },
    paidCents: { type: DataTypes.INTEGER, allowNull: true },
    paidCurrency: { type: DataTypes.STRING(3), allowNull: true },
    paidAt: { type: DataTypes.DATE, allowNull: true },
    expiredAt: { type: DataTypes.DATE, allowNull: true },
    declinedCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    refundedCents: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    refunds: jsonColumn("refunds", "{}"),
    refundRequestedAt: { type: DataTypes.DATE, allowNull: true },
    reviewReason: { type: DataTypes.TEXT, allowNull: true },
    receiptSentAt: { type: DataTypes.DATE, allowNull: true },
    refundNoticeSentAt: { type: DataTypes.DATE, allowNull: true },
    returnOrigin: { type: DataTypes.STRING(255), allowNull: true },
    ...ts,
  },
  { sequelize: db(), tableName: "orders" },
);
