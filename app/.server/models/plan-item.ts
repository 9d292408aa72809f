import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { jsonColumn as json, timestamps as ts } from "./columns";

export class PlanItem extends Model<InferAttributes<PlanItem>, InferCreationAttributes<PlanItem>> {
  declare id: CreationOptional<number>;
  declare planId: number;
  declare weekId: number;
  declare day: number;
  declare position: number;
  declare sourceSessionId: CreationOptional<number | null>;
  declare recurrenceId: CreationOptional<number | null>;
  declare name: string;
  declare sport: string;
  declare testProtocol: CreationOptional<string | null>;
  declare blocks: unknown;
  declare timeOfDay: CreationOptional<string | null>;
  declare notes: CreationOptional<string>;
  declare description: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
PlanItem.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    planId: { type: DataTypes.INTEGER, allowNull: false },
    weekId: { type: DataTypes.INTEGER, allowNull: false },
    day: { type: DataTypes.INTEGER, allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    sourceSessionId: { type: DataTypes.INTEGER, allowNull: true },
    recurrenceId: { type: DataTypes.INTEGER, allowNull: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    testProtocol: { type: DataTypes.STRING(32), allowNull: true },
    blocks: json("blocks", "[]"),
    timeOfDay: { type: DataTypes.STRING(5), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    ...ts,
  },
  { sequelize: db(), tableName: "plan_items" },
);
