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
