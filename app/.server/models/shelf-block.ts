import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { jsonColumn as json, timestamps as ts } from "./columns";

export class ShelfBlock extends Model<InferAttributes<ShelfBlock>, InferCreationAttributes<ShelfBlock>> {
  declare id: CreationOptional<number>;
  declare sessionId: number;
  declare position: number;
  declare kind: string;
  declare spec: unknown;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
ShelfBlock.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    sessionId: { type: DataTypes.INTEGER, allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING(16), allowNull: false },
    spec: json("spec", "{}"),
    ...ts,
  },
  { sequelize: db(), tableName: "session_blocks" },
);
