import { QueryTypes } from "sequelize";
import { hashPassword } from "~/.server/auth";
import { db, sqlDate } from "~/.server/db";
import { User } from "~/.server/models";
import { loadSeries } from "~/.server/services/load";
import { addDays, todayIn } from "~/lib/dates";
import { compare, type BenchFigure } from "./lib";

/** Load series over three years of daily sessions, for one athlete and for a roster of 50, against reading the same rows raw. */
export async function run(): Promise<BenchFigure[]> {
  const hash = await hashPassword("bench-password-1");
  const athletes: User[] = [];
  const now = sqlDate(new Date());
  const today = todayIn("UTC");
  for (let a = 0; a < 50; a++) {
    const u = await User.create({
      role: "athlete",
      email: `load.bench.${a}@example.test`,
      name: `Load ${a}`,
      passwordHash: hash,
    });
    athletes.push(u);
    const days = a === 0 ? 3 * 365 : 120;
    await db().query(
      `INSERT INTO scheduled_sessions (athlete_id, date, name, sport, status, effort_score, actual_minutes, planned_duration_s, planned_load, created_at, updated_at)
       WITH RECURSIVE k(n) AS (SELECT 0 UNION ALL SELECT n + 1 FROM k WHERE n < ?)
       SELECT ?, date(?, '-' || n || ' days'), 'S', 'bike', 'done', 1 + n % 9, 30 + n % 90, 3600, 300, ?, ? FROM k`,
      { replacements: [days - 1, u.id, today, now, now] },
    );
  }
  const three = addDays(today, -3 * 365 + 1);
  const raw = (ids: number[], from: string) => () =>
    db().query(
      "SELECT date, status, effort_score, actual_minutes, planned_load, planned_duration_s, trimp, work_kj, zone_minutes FROM scheduled_sessions WHERE athlete_id IN (:ids) AND date BETWEEN :from AND :to",
      {
        replacements: { ids, from, to: today },
        type: QueryTypes.SELECT,
      },
    );
  return [
    await compare(
      "load series, 3 years of daily data, one athlete",
      () => loadSeries(athletes[0], three, today),
      raw([athletes[0].id], three),
      { baselineName: "the same rows read raw from SQLite", runs: 7, aim: 2 },
    ),
    await compare(
      "load series (last 4 weeks) for a roster of 50",
      () => Promise.all(athletes.map((a) => loadSeries(a, addDays(today, -27), today))),
      raw(
        athletes.map((a) => a.id),
        addDays(today, -27 - 84),
      ),
      {
        baselineName: "the same rows read raw from SQLite",
        runs: 5,
        note: "50 separate series; the raw read is one query over all 50",
      },
    ),
  ];
}
