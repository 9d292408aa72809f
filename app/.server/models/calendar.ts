import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { timestamps as ts } from "./columns";

export class Threshold extends Model<InferAttributes<Threshold>, InferCreationAttributes<Threshold>> {
  declare id: CreationOptional<number>;
  declare athleteId: number;
  declare sport: "bike" | "run" | "swim";
  declare metric: "power" | "heart_rate" | "pace";
  declare value: number;
  declare unit: string;
  declare effectiveFrom: string;
  declare source: string;
  declare fieldTestId: CreationOptional<number | null>;
  declare sourceTests: CreationOptional<string | null>;
  declare createdBy: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
Threshold.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athleteId: { type: DataTypes.INTEGER, allowNull: false },
    sport: { type: DataTypes.STRING(8), allowNull: false },
    metric: { type: DataTypes.STRING(16), allowNull: false },
    value: { type: DataTypes.FLOAT, allowNull: false },
    unit: { type: DataTypes.STRING(8), allowNull: false },
    effectiveFrom: { type: DataTypes.DATEONLY, allowNull: false },
    source: { type: DataTypes.STRING(16), allowNull: false },
    fieldTestId: { type: DataTypes.INTEGER, allowNull: true },
    sourceTests: { type: DataTypes.TEXT, allowNull: true },
    createdBy: { type: DataTypes.INTEGER, allowNull: true },
    ...ts,
  },
  { sequelize: db(), tableName: "thresholds" },
);

export class Assignment extends Model<InferAttributes<Assignment>, InferCreationAttributes<Assignment>> {
  declare id: CreationOptional<number>;
  declare athleteId: number;
  declare planId: number | null;
  declare assignedBy: CreationOptional<number | null>;
  declare startDate: string;
  declare planVersion: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
Assignment.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    athleteId: { type: DataTypes.INTEGER, allowNull: false },
    planId: { type: DataTypes.INTEGER, allowNull: true },
    assignedBy: { type: DataTypes.INTEGER, allowNull: true },
    startDate: { type: DataTypes.DATEONLY, allowNull: false },
    planVersion: { type: DataTypes.INTEGER, allowNull: false },
    ...ts,
  },
  { sequelize: db(), tableName: "assignments" },
);

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

export class ScheduledBlock extends Model<InferAttributes<ScheduledBlock>, InferCreationAttributes<ScheduledBlock>> {
  declare id: CreationOptional<number>;
  declare scheduledSessionId: number;
  declare athleteId: number;
  declare date: string;
  declare sport: string;
  declare position: number;
  declare blockIndex: number;
  declare kind: string;
  declare part: string;
  declare rep: number | null;
  declare repCount: number | null;
  declare durationS: number;
  declare metric: string | null;
  declare lowPct: number | null;
  declare highPct: number | null;
  declare ramp: boolean;
  declare lowAbs: number | null;
  declare highAbs: number | null;
  declare unit: string | null;
  declare thresholdId: number | null;
  declare thresholdValue: number | null;
  declare cue: string | null;
  declare cadence: number | null;
}
ScheduledBlock.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    scheduledSessionId: { type: DataTypes.INTEGER, allowNull: false },
    athleteId: { type: DataTypes.INTEGER, allowNull: false },
    date: { type: DataTypes.DATEONLY, allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    blockIndex: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING(16), allowNull: false },
    part: { type: DataTypes.STRING(10), allowNull: false },
    rep: { type: DataTypes.INTEGER, allowNull: true },
    repCount: { type: DataTypes.INTEGER, allowNull: true },
    durationS: { type: DataTypes.INTEGER, allowNull: false },
    metric: { type: DataTypes.STRING(16), allowNull: true },
    lowPct: { type: DataTypes.FLOAT, allowNull: true },
    highPct: { type: DataTypes.FLOAT, allowNull: true },
    ramp: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    lowAbs: { type: DataTypes.INTEGER, allowNull: true },
    highAbs: { type: DataTypes.INTEGER, allowNull: true },
    unit: { type: DataTypes.STRING(8), allowNull: true },
    thresholdId: { type: DataTypes.INTEGER, allowNull: true },
    thresholdValue: { type: DataTypes.FLOAT, allowNull: true },
    cue: { type: DataTypes.STRING(200), allowNull: true },
    cadence: { type: DataTypes.INTEGER, allowNull: true },
  },
  { sequelize: db(), tableName: "scheduled_blocks", timestamps: false },
);
