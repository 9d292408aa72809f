import bcrypt from "bcryptjs";
import { sqlDate } from "../../app/.server/db";
import { QueryTypes, type QueryInterface } from "sequelize";
import { DEMO_ACCOUNTS } from "../demo/accounts";

/** The studio's people: one admin, one coach, and three athletes on the coach's roster. */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sequelize = qi.sequelize;
  const hash = await bcrypt.hash(DEMO_ACCOUNTS.password, 11);
  const now = sqlDate(new Date());
  await sequelize.transaction(async (transaction) => {
    for (const p of DEMO_ACCOUNTS.people) {
      const extra = p as Partial<{ sex: string; weightKg: number; restingHr: number; maxHr: number }>;
      await sequelize.query(
        `INSERT INTO users (role, email, password_hash, name, timezone, units, sex, weight_kg, resting_hr, max_hr, created_at, updated_at)
         VALUES (?, ?, ?, ?, ?, 'metric', ?, ?, ?, ?, ?, ?) ON CONFLICT DO NOTHING`,
        {
          replacements: [
            p.role,
            p.email,
            hash,
            p.name,
            p.timezone,
            extra.sex ?? null,
            extra.weightKg ?? null,
            extra.restingHr ?? null,
            extra.maxHr ?? null,
            now,
            now,
          ],
          transaction,
        },
      );
    }
    const [coach] = await sequelize.query<{ id: number }>("SELECT id FROM users WHERE email = ?", {
      replacements: [DEMO_ACCOUNTS.people[1].email],
      type: QueryTypes.SELECT,
      transaction,
    });
    const athletes = await sequelize.query<{ id: number }>(
      "SELECT id FROM users WHERE role = 'athlete' AND email IN (?)",
      {
        replacements: [DEMO_ACCOUNTS.people.filter((p) => p.role === "athlete").map((p) => p.email)],
        type: QueryTypes.SELECT,
        transaction,
      },
    );
    for (const a of athletes) {
      await sequelize.query(
        "INSERT INTO coach_athletes (coach_id, athlete_id, created_at, updated_at) VALUES (?, ?, ?, ?) ON CONFLICT DO NOTHING",
        { replacements: [coach.id, a.id, now, now], transaction },
      );
    }
  });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("DELETE FROM users WHERE email IN (?)", {
    replacements: [DEMO_ACCOUNTS.people.map((p) => p.email)],
  });
}
