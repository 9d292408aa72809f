import { DataTypes, type Model } from "sequelize";

/** Created/updated timestamps, as every table with them declares them. */
export const timestamps = { createdAt: DataTypes.DATE, updatedAt: DataTypes.DATE };

/** A TEXT column holding JSON: parsed on read, serialised on write. */
export function jsonColumn(field: string, fallback: string) {
  return {
    type: DataTypes.TEXT,
    allowNull: false,
    defaultValue: fallback,
    get(this: Model) {
      return JSON.parse((this.getDataValue(field as never) as string) ?? fallback);
    },
    set(this: Model, value: unknown) {
      this.setDataValue(field as never, JSON.stringify(value) as never);
    },
  };
}
