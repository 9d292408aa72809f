import { DataTypes, type QueryInterface } from "sequelize";

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable("listings", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    plan_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "season_plans", key: "id" },
      onDelete: "CASCADE",
    },
    coach_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    slug: { type: DataTypes.STRING(80), allowNull: false, unique: true },
    title: { type: DataTypes.STRING(120), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false },
    sport: { type: DataTypes.STRING(16), allowNull: false },
    level: { type: DataTypes.STRING(16), allowNull: false },
    weeks: { type: DataTypes.INTEGER, allowNull: false },
    weekly_hours: { type: DataTypes.FLOAT, allowNull: false },
    price_cents: { type: DataTypes.INTEGER, allowNull: false },
    currency: { type: DataTypes.STRING(3), allowNull: false },
    published: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    ...timestamps,
  });
  await qi.createTable("orders", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    listing_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "listings", key: "id" },
      onDelete: "RESTRICT",
    },
    buyer_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: "users", key: "id" },
      onDelete: "CASCADE",
    },
    status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: "pending" },
    amount_cents: { type: DataTypes.INTEGER, allowNull: false },
    currency: { type: DataTypes.STRING(3), allowNull: false },
    align_mode: { type: DataTypes.STRING(8), allowNull: false },
    align_date: { type: DataTypes.DATEONLY, allowNull: false },
    checkout_session_id: { type: DataTypes.STRING(255), allowNull: true, unique: true },
    payment_intent_id: { type: DataTypes.STRING(255), allowNull: true },
    assignment_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: "assignments", key: "id" },
      onDelete: "SET NULL",
    },
    note: { type: DataTypes.TEXT, allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("orders", ["listing_id"]);
  await qi.addIndex("orders", ["buyer_id"]);
  // The provider's event id is unique: a replayed webhook finds its row and does nothing.
  await qi.createTable("payment_events", {
    id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
    provider_event_id: { type: DataTypes.STRING(255), allowNull: false, unique: true },
    type: { type: DataTypes.STRING(64), allowNull: false },
    order_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: "orders", key: "id" },
      onDelete: "SET NULL",
    },
    outcome: { type: DataTypes.STRING(32), allowNull: false },
    payload: { type: DataTypes.TEXT, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable("payment_events");
  await qi.dropTable("orders");
  await qi.dropTable("listings");
}
