import { DataTypes, type QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  // A coach's edited intensity band set for one sport and metric; no row means Pacewright's default set.
  await qi.createTable("band_sets", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    coach_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    set_key: { type: DataTypes.STRING(24), allowNull: false },
    bands: { type: DataTypes.TEXT, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex("band_sets", ["coach_id", "set_key"], { unique: true });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("band_sets");
}
