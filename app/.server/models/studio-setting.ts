import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";

export class StudioSetting extends Model<InferAttributes<StudioSetting>, InferCreationAttributes<StudioSetting>> {
  declare key: string;
  declare value: string;
  declare updatedAt: CreationOptional<Date>;
}
StudioSetting.init(
  {
    key: { type: DataTypes.STRING(64), primaryKey: true },
    value: { type: DataTypes.TEXT, allowNull: false },
    updatedAt: DataTypes.DATE,
  },
  { sequelize: db(), tableName: "studio_settings", createdAt: false },
);
