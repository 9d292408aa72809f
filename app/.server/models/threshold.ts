import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { timestamps as ts } from "./columns";

export class Threshold extends Model<InferAttributes<Threshold>, InferCreationAttributes<Threshold>> {
  declare id: CreationOptional<number>;
  declare athleteId: number;
  declare sport: "bike" | "run" | "swim";
  declare metric: "power" | "heart_rate" | "pace";
  declare value: number;
  declare unit: string;
  declare effectiveFrom: string;
  declare source: string;
  declare fieldTestId: CreationOptional<number | null>;
  declare sourceTests: CreationOptional<string | null>;
  declare createdBy: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
Threshold.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athleteId: { type: DataTypes.INTEGER, allowNull: false },
    sport: { type: DataTypes.STRING(8), allowNull: false },
    metric: { type: DataTypes.STRING(16), allowNull: false },
    value: { type: DataTypes.FLOAT, allowNull: false },
    unit: { type: DataTypes.STRING(8), allowNull: false },
    effectiveFrom: { type: DataTypes.DATEONLY, allowNull: false },
    source: { type: DataTypes.STRING(16), allowNull: false },
    fieldTestId: { type: DataTypes.INTEGER, allowNull: true },
    sourceTests: { type: DataTypes.TEXT, allowNull: true },
    createdBy: { type: DataTypes.INTEGER, allowNull: true },
    ...ts,
  },
  { sequelize: db(), tableName: "thresholds" },
);
