import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";

export class OutboundEmail extends Model<InferAttributes<OutboundEmail>, InferCreationAttributes<OutboundEmail>> {
  declare id: CreationOptional<number>;
  declare toAddress: string;
  declare subject: string;
  declare template: string;
  declare textBody: string;
  declare htmlBody: string;
  declare status: CreationOptional<"pending" | "sent" | "failed">;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date;
  declare lastError: CreationOptional<string | null>;
  declare messageId: CreationOptional<string | null>;
  declare sentAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
OutboundEmail.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    toAddress: { type: DataTypes.STRING(320), allowNull: false },
    subject: { type: DataTypes.STRING(255), allowNull: false },
    template: { type: DataTypes.STRING(64), allowNull: false },
    textBody: { type: DataTypes.TEXT, allowNull: false },
    htmlBody: { type: DataTypes.TEXT, allowNull: false },
    status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: "pending" },
    attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    nextAttemptAt: { type: DataTypes.DATE, allowNull: false },
    lastError: { type: DataTypes.TEXT, allowNull: true },
    messageId: { type: DataTypes.STRING(255), allowNull: true },
    sentAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize: db(), tableName: "outbound_emails" },
);
