import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";

export class PaymentEvent extends Model<InferAttributes<PaymentEvent>, InferCreationAttributes<PaymentEvent>> {
  declare id: CreationOptional<number>;
  declare providerEventId: string;
  declare type: string;
  declare orderId: number | null;
  declare outcome: string;
  declare payload: string;
  declare createdAt: CreationOptional<Date>;
}
PaymentEvent.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    providerEventId: { type: DataTypes.STRING(255), allowNull: false },
    type: { type: DataTypes.STRING(64), allowNull: false },
    orderId: { type: DataTypes.INTEGER, allowNull: true },
    outcome: { type: DataTypes.STRING(32), allowNull: false },
    payload: { type: DataTypes.TEXT, allowNull: false },
    createdAt: DataTypes.DATE,
  },
  { sequelize: db(), tableName: "payment_events", updatedAt: false },
);
