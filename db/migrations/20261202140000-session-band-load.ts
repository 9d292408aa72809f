import { DataTypes, QueryTypes, type QueryInterface } from "sequelize";

/**
 * Band load stored per session: the power-based load of a ride that has no effort score, so the load model can count
 * it without reading the file again. Sessions already done with minutes per band are filled in from those minutes
 * (weight = the band's place from the bottom, as in bandLoad).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn("scheduled_sessions", "band_load", { type: DataTypes.FLOAT, allowNull: true });
  const rows = await qi.sequelize.query<{ id: number; zone_minutes: string }>(
    "SELECT id, zone_minutes FROM scheduled_sessions WHERE zone_minutes IS NOT NULL AND status = 'done'",
    { type: QueryTypes.SELECT },
  );
  for (const r of rows) {
    let minutes: unknown;
    try {
      minutes = JSON.parse(r.zone_minutes);
    } catch {
      continue;
    }
    if (!Array.isArray(minutes) || !minutes.every((m) => typeof m === "number")) continue;
    const load = minutes.reduce((a: number, m: number, i: number) => a + m * (i + 1), 0);
    await qi.sequelize.query("UPDATE scheduled_sessions SET band_load = ? WHERE id = ?", {
      replacements: [load, r.id],
    });
  }
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.removeColumn("scheduled_sessions", "band_load");
}
