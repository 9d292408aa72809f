import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";

export class CoachAthlete extends Model<InferAttributes<CoachAthlete>, InferCreationAttributes<CoachAthlete>> {
  declare id: CreationOptional<number>;
  declare coachId: number;
  declare athleteId: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
CoachAthlete.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    coachId: { type: DataTypes.INTEGER, allowNull: false },
    athleteId: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize: db(), tableName: "coach_athletes" },
);
