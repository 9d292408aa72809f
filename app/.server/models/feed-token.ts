import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";

export class FeedToken extends Model<InferAttributes<FeedToken>, InferCreationAttributes<FeedToken>> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare salt: string;
  declare tokenHash: string;
  declare revokedAt: CreationOptional<Date | null>;
  declare lastUsedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
FeedToken.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    userId: { type: DataTypes.INTEGER, allowNull: false },
    salt: { type: DataTypes.STRING(64), allowNull: false },
    tokenHash: { type: DataTypes.STRING(64), allowNull: false },
    revokedAt: { type: DataTypes.DATE, allowNull: true },
    lastUsedAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize: db(), tableName: "feed_tokens" },
);
