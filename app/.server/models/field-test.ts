import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { jsonColumn as json, timestamps as ts } from "./columns";

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
