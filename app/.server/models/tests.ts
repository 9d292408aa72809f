import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { jsonColumn as json, timestamps as ts } from "./columns";

export class Upload extends Model<InferAttributes<Upload>, InferCreationAttributes<Upload>> {
  declare id: CreationOptional<number>;
  declare athleteId: number;
  declare uploadedBy: number | null;
  declare kind: CreationOptional<string>;
  declare originalName: string;
  declare format: string;
  declare size: number;
  declare storageKey: string;
  declare summary: unknown;
  declare laps: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
Upload.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athleteId: { type: DataTypes.INTEGER, allowNull: false },
    uploadedBy: { type: DataTypes.INTEGER, allowNull: true },
    kind: { type: DataTypes.STRING(16), allowNull: false, defaultValue: "activity" },
    originalName: { type: DataTypes.STRING(255), allowNull: false },
    format: { type: DataTypes.STRING(8), allowNull: false },
    size: { type: DataTypes.INTEGER, allowNull: false },
    storageKey: { type: DataTypes.STRING(255), allowNull: false },
    summary: json("summary", "{}"),
    laps: { type: DataTypes.TEXT, allowNull: true },
    ...ts,
  },
  { sequelize: db(), tableName: "uploads" },
);

export class FieldTest extends Model<InferAttributes<FieldTest>, InferCreationAttributes<FieldTest>> {
  declare id: CreationOptional<number>;
  declare athleteId: number;
  declare protocol: string;
  declare sport: string;
  declare metric: string;
  declare inputs: unknown;
  declare derived: unknown;
  declare value: number;
  declare unit: string;
  declare testedOn: string;
  declare uploadId: CreationOptional<number | null>;
  declare thresholdId: CreationOptional<number | null>;
  declare readiness: CreationOptional<string | null>;
  declare status: CreationOptional<"active" | "undone">;
  declare undoneAt: CreationOptional<Date | null>;
  declare undoneBy: CreationOptional<number | null>;
  declare requestKey: CreationOptional<string | null>;
  declare createdBy: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
FieldTest.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athleteId: { type: DataTypes.INTEGER, allowNull: false },
    protocol: { type: DataTypes.STRING(32), allowNull: false },
    sport: { type: DataTypes.STRING(8), allowNull: false },
    metric: { type: DataTypes.STRING(16), allowNull: false },
    inputs: json("inputs", "{}"),
    derived: json("derived", "{}"),
    value: { type: DataTypes.FLOAT, allowNull: false },
    unit: { type: DataTypes.STRING(8), allowNull: false },
    testedOn: { type: DataTypes.DATEONLY, allowNull: false },
    uploadId: { type: DataTypes.INTEGER, allowNull: true },
    thresholdId: { type: DataTypes.INTEGER, allowNull: true },
    readiness: { type: DataTypes.TEXT, allowNull: true },
    status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: "active" },
    undoneAt: { type: DataTypes.DATE, allowNull: true },
    undoneBy: { type: DataTypes.INTEGER, allowNull: true },
    requestKey: { type: DataTypes.STRING(64), allowNull: true },
    createdBy: { type: DataTypes.INTEGER, allowNull: true },
    ...ts,
  },
  { sequelize: db(), tableName: "field_tests" },
);

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
