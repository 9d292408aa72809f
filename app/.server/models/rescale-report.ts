import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { jsonColumn as json, timestamps as ts } from "./columns";

export class RescaleReport extends Model<InferAttributes<RescaleReport>, InferCreationAttributes<RescaleReport>> {
  declare id: CreationOptional<number>;
  declare athleteId: number;
  declare fieldTestId: number | null;
  declare kind: "apply" | "undo";
  declare sport: string;
  declare metric: string;
  declare oldValue: number | null;
  declare newValue: number | null;
  declare unit: string;
  declare fromDate: string;
  declare sessionsChanged: number;
  declare blocksChanged: number;
  declare examples: CreationOptional<{ date: string; name: string; before: string; after: string }[]>;
  declare guard: CreationOptional<{
    flagged: boolean;
    changePct: number | null;
    headline: string | null;
    reasons: string[];
  } | null>;
  declare confirmedBy: CreationOptional<number | null>;
  declare confirmedAt: CreationOptional<Date | null>;
  declare createdBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
RescaleReport.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athleteId: { type: DataTypes.INTEGER, allowNull: false },
    fieldTestId: { type: DataTypes.INTEGER, allowNull: true },
    kind: { type: DataTypes.STRING(8), allowNull: false },
    sport: { type: DataTypes.STRING(8), allowNull: false },
    metric: { type: DataTypes.STRING(16), allowNull: false },
    oldValue: { type: DataTypes.FLOAT, allowNull: true },
    newValue: { type: DataTypes.FLOAT, allowNull: true },
    unit: { type: DataTypes.STRING(8), allowNull: false },
    fromDate: { type: DataTypes.DATEONLY, allowNull: false },
    sessionsChanged: { type: DataTypes.INTEGER, allowNull: false },
    blocksChanged: { type: DataTypes.INTEGER, allowNull: false },
    examples: json("examples", "[]"),
    guard: json("guard", "null"),
    confirmedBy: { type: DataTypes.INTEGER, allowNull: true },
    confirmedAt: { type: DataTypes.DATE, allowNull: true },
    createdBy: { type: DataTypes.INTEGER, allowNull: true },
    ...ts,
  },
  { sequelize: db(), tableName: "rescale_reports" },
);
