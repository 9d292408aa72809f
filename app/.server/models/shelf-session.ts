import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { jsonColumn as json, timestamps as ts } from "./columns";

export class ShelfSession extends Model<InferAttributes<ShelfSession>, InferCreationAttributes<ShelfSession>> {
  declare id: CreationOptional<number>;
  declare ownerId: number;
  declare name: string;
  declare sport: string;
  declare description: CreationOptional<string>;
  declare tags: CreationOptional<string[]>;
  declare testProtocol: CreationOptional<string | null>;
  declare archived: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
ShelfSession.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    ownerId: { type: DataTypes.INTEGER, allowNull: false },
    name: { type: DataTypes.STRING(120), allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    tags: json("tags", "[]"),
    testProtocol: { type: DataTypes.STRING(32), allowNull: true },
    archived: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    ...ts,
  },
  { sequelize: db(), tableName: "sessions" },
);
