import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { timestamps as ts } from "./columns";

export class PlanRecurrence extends Model<InferAttributes<PlanRecurrence>, InferCreationAttributes<PlanRecurrence>> {
  declare id: CreationOptional<number>;
  declare planId: number;
  declare sourceSessionId: number | null;
  declare rule: string;
  declare summary: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
PlanRecurrence.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    planId: { type: DataTypes.INTEGER, allowNull: false },
    sourceSessionId: { type: DataTypes.INTEGER, allowNull: true },
    rule: { type: DataTypes.STRING(255), allowNull: false },
    summary: { type: DataTypes.STRING(255), allowNull: false },
    ...ts,
  },
  { sequelize: db(), tableName: "plan_recurrences" },
);
