import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { timestamps as ts } from "./columns";

export class PlanWeek extends Model<InferAttributes<PlanWeek>, InferCreationAttributes<PlanWeek>> {
  declare id: CreationOptional<number>;
  declare planId: number;
  declare idx: number;
  declare phase: string;
  declare recovery: CreationOptional<boolean>;
  declare test: CreationOptional<boolean>;
  declare loadFactor: number;
  declare plannedHours: number;
  declare notes: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
PlanWeek.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    planId: { type: DataTypes.INTEGER, allowNull: false },
    idx: { type: DataTypes.INTEGER, allowNull: false },
    phase: { type: DataTypes.STRING(16), allowNull: false },
    recovery: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    test: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    loadFactor: { type: DataTypes.FLOAT, allowNull: false },
    plannedHours: { type: DataTypes.FLOAT, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    ...ts,
  },
  { sequelize: db(), tableName: "plan_weeks" },
);
