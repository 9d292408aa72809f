import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { timestamps as ts } from "./columns";

export type SessionStatus = "planned" | "done" | "skipped" | "cancelled";

export class ScheduledSession extends Model<
  InferAttributes<ScheduledSession>,
  InferCreationAttributes<ScheduledSession>
> {
  declare id: CreationOptional<number>;
  declare athleteId: number;
  declare assignmentId: CreationOptional<number | null>;
  declare planItemId: CreationOptional<number | null>;
  declare date: string;
  declare position: CreationOptional<number>;
  declare timeOfDay: CreationOptional<string | null>;
  declare name: string;
  declare sport: string;
  declare testProtocol: CreationOptional<string | null>;
  declare notes: CreationOptional<string>;
  declare description: CreationOptional<string>;
  declare plannedDurationS: CreationOptional<number>;
  declare plannedLoad: CreationOptional<number>;
  declare status: CreationOptional<SessionStatus>;
  declare effortScore: CreationOptional<number | null>;
  declare actualMinutes: CreationOptional<number | null>;
  declare comment: CreationOptional<string | null>;
  declare completedAt: CreationOptional<Date | null>;
  declare cancelledAt: CreationOptional<Date | null>;
  declare feedSequence: CreationOptional<number>;
  declare uploadId: CreationOptional<number | null>;
  declare workKj: CreationOptional<number | null>;
  declare trimp: CreationOptional<number | null>;
  declare zoneMinutes: CreationOptional<string | null>;
  /** Power-based load of a ride (bandLoad), counted by the load model when the session has no effort score. */
  declare bandLoad: CreationOptional<number | null>;
  declare targetedS: CreationOptional<number | null>;
  declare inTargetS: CreationOptional<number | null>;
  declare pacingSplit: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
ScheduledSession.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athleteId: { type: DataTypes.INTEGER, allowNull: false },
    assignmentId: { type: DataTypes.INTEGER, allowNull: true },
    planItemId: { type: DataTypes.INTEGER, allowNull: true },
    date: { type: DataTypes.DATEONLY, allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    timeOfDay: { type: DataTypes.STRING(5), allowNull: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    testProtocol: { type: DataTypes.STRING(32), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    plannedDurationS: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    plannedLoad: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 0 },
    status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: "planned" },
    effortScore: { type: DataTypes.INTEGER, allowNull: true },
    actualMinutes: { type: DataTypes.FLOAT, allowNull: true },
    comment: { type: DataTypes.TEXT, allowNull: true },
    completedAt: { type: DataTypes.DATE, allowNull: true },
    cancelledAt: { type: DataTypes.DATE, allowNull: true },
    feedSequence: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    uploadId: { type: DataTypes.INTEGER, allowNull: true },
    workKj: { type: DataTypes.FLOAT, allowNull: true },
    trimp: { type: DataTypes.FLOAT, allowNull: true },
    zoneMinutes: { type: DataTypes.TEXT, allowNull: true },
    bandLoad: { type: DataTypes.FLOAT, allowNull: true },
    targetedS: { type: DataTypes.INTEGER, allowNull: true },
    inTargetS: { type: DataTypes.INTEGER, allowNull: true },
    pacingSplit: { type: DataTypes.TEXT, allowNull: true },
    ...ts,
  },
  { sequelize: db(), tableName: "scheduled_sessions" },
);
