import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes } from "sequelize";
import { db } from "../db";

import { ROLES, type Role } from "~/lib/roles";

export { ROLES, type Role };

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare role: Role;
  declare email: string;
  declare passwordHash: string;
  declare name: string;
  declare timezone: CreationOptional<string>;
  declare units: CreationOptional<"metric" | "imperial">;
  declare sex: CreationOptional<"female" | "male" | null>;
  declare weightKg: CreationOptional<number | null>;
  declare restingHr: CreationOptional<number | null>;
  declare maxHr: CreationOptional<number | null>;
  declare feedAlarmMinutes: CreationOptional<number | null>;
  /** Usual start time per weekday (Monday first), "HH:MM" or null for all-day events in the feed. */
  declare trainingTimes: CreationOptional<(string | null)[] | null>;
  declare totpSecret: CreationOptional<string | null>;
  declare totpEnabledAt: CreationOptional<Date | null>;
  declare totpLastStep: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

User.init(
  {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    role: { type: DataTypes.STRING(16), allowNull: false, validate: { isIn: [ROLES as unknown as string[]] } },
    email: {
      type: DataTypes.STRING,
      allowNull: false,
      unique: true,
      set(value: string) {
        this.setDataValue("email", value.trim().toLowerCase());
      },
    },
    passwordHash: { type: DataTypes.STRING, allowNull: false },
    name: { type: DataTypes.STRING(120), allowNull: false },
    timezone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: "UTC" },
    units: { type: DataTypes.STRING(16), allowNull: false, defaultValue: "metric" },
    sex: { type: DataTypes.STRING(8), allowNull: true },
    weightKg: { type: DataTypes.FLOAT, allowNull: true },
    restingHr: { type: DataTypes.INTEGER, allowNull: true },
    maxHr: { type: DataTypes.INTEGER, allowNull: true },
    feedAlarmMinutes: { type: DataTypes.INTEGER, allowNull: true },
    trainingTimes: {
      type: DataTypes.TEXT,
      allowNull: true,
      get(this: User) {
        const raw = this.getDataValue("trainingTimes") as unknown as string | null;
        return raw ? (JSON.parse(raw) as (string | null)[]) : null;
      },
      set(this: User, v: (string | null)[] | null) {
        this.setDataValue("trainingTimes", (v ? JSON.stringify(v) : null) as never);
      },
    },
    totpSecret: { type: DataTypes.STRING(64), allowNull: true },
    totpEnabledAt: { type: DataTypes.DATE, allowNull: true },
    totpLastStep: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize: db(), tableName: "users" },
);

/** What the browser may see of a user: never the password hash. */
export function publicUser(u: User) {
  return {
    id: u.id,
    role: u.role,
    email: u.email,
    name: u.name,
    timezone: u.timezone,
    units: u.units,
  };
}
export type PublicUser = ReturnType<typeof publicUser>;
