import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { timestamps as ts } from "./columns";

export class SeasonPlan extends Model<InferAttributes<SeasonPlan>, InferCreationAttributes<SeasonPlan>> {
  declare id: CreationOptional<number>;
  declare ownerId: number;
  declare name: string;
  declare sport: string;
  declare description: CreationOptional<string>;
  declare alignment: "start" | "event";
  declare startDate: CreationOptional<string | null>;
  declare eventDate: CreationOptional<string | null>;
  declare weeklyHours: number;
  declare pattern: "3:1" | "2:1";
  declare testEveryWeeks: number;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
SeasonPlan.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    ownerId: { type: DataTypes.INTEGER, allowNull: false },
    name: { type: DataTypes.STRING(120), allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    alignment: { type: DataTypes.STRING(8), allowNull: false },
    startDate: { type: DataTypes.DATEONLY, allowNull: true },
    eventDate: { type: DataTypes.DATEONLY, allowNull: true },
    weeklyHours: { type: DataTypes.FLOAT, allowNull: false },
    pattern: { type: DataTypes.STRING(4), allowNull: false },
    testEveryWeeks: { type: DataTypes.INTEGER, allowNull: false },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    ...ts,
  },
  { sequelize: db(), tableName: "season_plans" },
);
