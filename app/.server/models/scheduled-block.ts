import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";

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
