import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { jsonColumn, timestamps } from "./columns";

export class BandSetRow extends Model<InferAttributes<BandSetRow>, InferCreationAttributes<BandSetRow>> {
  declare id: CreationOptional<number>;
  declare coachId: number;
  declare setKey: string;
  declare bands: unknown;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
BandSetRow.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    coachId: { type: DataTypes.INTEGER, allowNull: false },
    setKey: { type: DataTypes.STRING(24), allowNull: false },
    bands: jsonColumn("bands", "[]"),
    ...timestamps,
  },
  { sequelize: db(), tableName: "band_sets" },
);
