import { DataTypes, type QueryInterface } from "sequelize";
import { dropColumn } from "../portable";

export async function up({ context: qi }: { context: QueryInterface }) {
  // What the plausibility guard said about a rescale (flag, change, reasons), and who confirmed it when flagged.
  await qi.addColumn("rescale_reports", "guard", { type: DataTypes.TEXT, allowNull: true });
  await qi.addColumn("rescale_reports", "confirmed_by", {
    type: DataTypes.INTEGER,
    allowNull: true,
    references: { model: "users", key: "id" },
    onDelete: "SET NULL",
  });
  await qi.addColumn("rescale_reports", "confirmed_at", { type: DataTypes.DATE, allowNull: true });
  // Who removed a test (undone_at already says when).
  await qi.addColumn("field_tests", "undone_by", {
    type: DataTypes.INTEGER,
    allowNull: true,
    references: { model: "users", key: "id" },
    onDelete: "SET NULL",
  });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await dropColumn(qi, "field_tests", "undone_by");
  await dropColumn(qi, "rescale_reports", "confirmed_at");
  await dropColumn(qi, "rescale_reports", "confirmed_by");
  await dropColumn(qi, "rescale_reports", "guard");
}
