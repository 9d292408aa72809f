import { QueryTypes } from "sequelize";
import { hashPassword } from "~/.server/auth";
import { db, sqlDate } from "~/.server/db";
import { CoachAthlete, Threshold, User } from "~/.server/models";
import { rosterFor } from "~/.server/services/roster";
import { addDays, todayIn } from "~/lib/dates";
import { compare } from "./lib";
import { countStatements } from "./statements";

/**
 * The roster of a coach with 50 athletes: each row shows thresholds, retest due and four weeks of load. The
 * baseline reads the same rows (athletes, their thresholds and their last four weeks of sessions) in one join.
 */
export async function run() {
  const hash = await hashPassword("bench-password-1");
  const coach = await User.create({
    role: "coach",
    email: "bench.coach@example.test",
    name: "Bench Coach",
    passwordHash: hash,
  });
  const today = todayIn("UTC");
  const now = sqlDate(new Date());
  for (let i = 0; i < 50; i++) {
    const a = await User.create({
      role: "athlete",
      email: `bench.${i}@example.test`,
      name: `Athlete ${i}`,
      passwordHash: hash,
    });
    await CoachAthlete.create({ coachId: coach.id, athleteId: a.id });
    await Threshold.create({
      athleteId: a.id,
      sport: "bike",
      metric: "power",
      value: 240 + i,
      unit: "W",
      effectiveFrom: addDays(today, -60),
      source: "manual",
    });
    await db().query(
      `INSERT INTO scheduled_sessions (athlete_id, date, name, sport, status, effort_score, actual_minutes, planned_duration_s, planned_load, created_at, updated_at)
       WITH RECURSIVE k(n) AS (SELECT 0 UNION ALL SELECT n + 1 FROM k WHERE n < 27)
       SELECT ?, date(?, '-' || n || ' days'), 'S', 'bike', CASE WHEN n % 3 = 0 THEN 'planned' ELSE 'done' END, 5, 60, 3600, 300, ?, ? FROM k`,
      { replacements: [a.id, today, now, now] },
    );
  }
  const from = addDays(today, -27);
  const raw = () =>
    db().query(
      `SELECT u.id, u.name, u.email, u.timezone, ca.created_at, t.sport, t.metric, t.value, t.effective_from, s.date, s.status, s.effort_score, s.actual_minutes, s.planned_load
       FROM coach_athletes ca JOIN users u ON u.id = ca.athlete_id
       LEFT JOIN thresholds t ON t.athlete_id = u.id
       LEFT JOIN scheduled_sessions s ON s.athlete_id = u.id AND s.date BETWEEN ? AND ?
       WHERE ca.coach_id = ? ORDER BY u.name`,
      { replacements: [from, today, coach.id], type: QueryTypes.SELECT },
    );
  const { statements } = await countStatements(() => rosterFor(coach.id));
  const figure = await compare(
    "roster of 50 athletes, with thresholds, retest due and 4-week load",
    () => rosterFor(coach.id),
    raw,
    {
      baselineName: "one raw join over the same athlete, threshold and session rows",
      runs: 10,
      aim: 3,
    },
  );
  figure.note = `${statements} SQL statements (aim ≤ 10)`;
  return [figure];
}
