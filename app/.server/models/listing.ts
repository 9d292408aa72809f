import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { timestamps as ts } from "./columns";

export class Listing extends Model<InferAttributes<Listing>, InferCreationAttributes<Listing>> {
  declare id: CreationOptional<number>;
  declare planId: number;
  declare coachId: number;
  declare slug: string;
  declare title: string;
  declare description: string;
  declare sport: string;
  declare level: string;
  declare weeks: number;
  declare weeklyHours: number;
  declare priceCents: number;
  declare currency: string;
  declare published: CreationOptional<boolean>;
  declare coverText: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
Listing.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    planId: { type: DataTypes.INTEGER, allowNull: false },
    coachId: { type: DataTypes.INTEGER, allowNull: false },
    slug: { type: DataTypes.STRING(80), allowNull: false },
    title: { type: DataTypes.STRING(120), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    level: { type: DataTypes.STRING(16), allowNull: false },
    weeks: { type: DataTypes.INTEGER, allowNull: false },
    weeklyHours: { type: DataTypes.FLOAT, allowNull: false },
    priceCents: { type: DataTypes.INTEGER, allowNull: false },
    currency: { type: DataTypes.STRING(3), allowNull: false },
    published: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    coverText: { type: DataTypes.STRING(200), allowNull: true },
    ...ts,
  },
  { sequelize: db(), tableName: "listings" },
);
