import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { timestamps as ts } from "./columns";

/** One message in the thread of a scheduled session, between the athlete and their coach. */
export class SessionComment extends Model<InferAttributes<SessionComment>, InferCreationAttributes<SessionComment>> {
  declare id: CreationOptional<number>;
  declare scheduledSessionId: number;
  declare authorId: number;
  declare body: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
SessionComment.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    scheduledSessionId: { type: DataTypes.INTEGER, allowNull: false },
    authorId: { type: DataTypes.INTEGER, allowNull: false },
    body: { type: DataTypes.TEXT, allowNull: false },
    ...ts,
  },
  { sequelize: db(), tableName: "session_comments" },
);
