import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";
import { jsonColumn as json, timestamps as ts } from "./columns";

export class Session extends Model<InferAttributes<Session>, InferCreationAttributes<Session>> {
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
Session.init(
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

export class SessionBlock extends Model<InferAttributes<SessionBlock>, InferCreationAttributes<SessionBlock>> {
  declare id: CreationOptional<number>;
  declare sessionId: number;
  declare position: number;
  declare kind: string;
  declare spec: unknown;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
SessionBlock.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    sessionId: { type: DataTypes.INTEGER, allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    kind: { type: DataTypes.STRING(16), allowNull: false },
    spec: json("spec", "{}"),
    ...ts,
  },
  { sequelize: db(), tableName: "session_blocks" },
);

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

export class PlanWeek extends Model<InferAttributes<PlanWeek>, InferCreationAttributes<PlanWeek>> {
  declare id: CreationOptional<number>;
  declare planId: number;
  declare idx: number;
  declare phase: string;
  declare recovery: CreationOptional<boolean>;
  declare test: CreationOptional<boolean>;
  declare loadFactor: number;
  declare plannedHours: number;
  declare notes: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
PlanWeek.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    planId: { type: DataTypes.INTEGER, allowNull: false },
    idx: { type: DataTypes.INTEGER, allowNull: false },
    phase: { type: DataTypes.STRING(16), allowNull: false },
    recovery: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    test: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    loadFactor: { type: DataTypes.FLOAT, allowNull: false },
    plannedHours: { type: DataTypes.FLOAT, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    ...ts,
  },
  { sequelize: db(), tableName: "plan_weeks" },
);

export class PlanRecurrence extends Model<InferAttributes<PlanRecurrence>, InferCreationAttributes<PlanRecurrence>> {
  declare id: CreationOptional<number>;
  declare planId: number;
  declare sourceSessionId: number | null;
  declare rule: string;
  declare summary: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
PlanRecurrence.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    planId: { type: DataTypes.INTEGER, allowNull: false },
    sourceSessionId: { type: DataTypes.INTEGER, allowNull: true },
    rule: { type: DataTypes.STRING(255), allowNull: false },
    summary: { type: DataTypes.STRING(255), allowNull: false },
    ...ts,
  },
  { sequelize: db(), tableName: "plan_recurrences" },
);

export class PlanItem extends Model<InferAttributes<PlanItem>, InferCreationAttributes<PlanItem>> {
  declare id: CreationOptional<number>;
  declare planId: number;
  declare weekId: number;
  declare day: number;
  declare position: number;
  declare sourceSessionId: CreationOptional<number | null>;
  declare recurrenceId: CreationOptional<number | null>;
  declare name: string;
  declare sport: string;
  declare testProtocol: CreationOptional<string | null>;
  declare blocks: unknown;
  declare timeOfDay: CreationOptional<string | null>;
  declare notes: CreationOptional<string>;
  declare description: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}
PlanItem.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    planId: { type: DataTypes.INTEGER, allowNull: false },
    weekId: { type: DataTypes.INTEGER, allowNull: false },
    day: { type: DataTypes.INTEGER, allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    sourceSessionId: { type: DataTypes.INTEGER, allowNull: true },
    recurrenceId: { type: DataTypes.INTEGER, allowNull: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    testProtocol: { type: DataTypes.STRING(32), allowNull: true },
    blocks: json("blocks", "[]"),
    timeOfDay: { type: DataTypes.STRING(5), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    ...ts,
  },
  { sequelize: db(), tableName: "plan_items" },
);
