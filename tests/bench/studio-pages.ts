/**
 * Measures the studio pages on one studio database (argument: its file) and prints JSON: per page the median time,
 * the SQL statements and the rows the database returned. Run by studio.bench.ts, once per studio, in its own process
 * (the app keeps one database connection per process).
 */
import { performance } from "node:perf_hooks";

const file = process.argv[2];
process.env.DATABASE_PATH = file;
process.env.MIGRATE_QUIET = "1";
process.env.PACEWRIGHT_FAKES = "on";
process.env.NODE_ENV ??= "production";
delete process.env.DATABASE_URL;

const { db } = await import("~/.server/db");
const { startSignIn } = await import("~/.server/auth");
const { User } = await import("~/.server/models");
const { buildFeed } = await import("~/.server/services/feed-calendar");
const { addDays, todayIn } = await import("~/lib/dates");
const roster = await import("~/routes/coach/roster");
const board = await import("~/routes/coach/board");
const calendar = await import("~/routes/api/calendar");
const load = await import("~/routes/api/athlete-load");
const { QueryTypes } = await import("sequelize");

const BASE = "http://localhost:3000";
const coach = (await User.findOne({ where: { role: "coach" }, order: [["id", "ASC"]] }))!;
const [{ athlete_id: athleteId }] = await db().query<{ athlete_id: number }>(
  "SELECT MIN(athlete_id) AS athlete_id FROM coach_athletes WHERE coach_id = ?",
  { replacements: [coach.id], type: QueryTypes.SELECT },
);
const athlete = (await User.findByPk(athleteId))!;
const [{ id: planId }] = await db().query<{ id: number }>("SELECT MIN(id) AS id FROM season_plans WHERE owner_id = ?", {
  replacements: [coach.id],
  type: QueryTypes.SELECT,
});
const cookie = (await startSignIn(coach, new Request(BASE))).split(";")[0];
const get = (path: string) => new Request(`${BASE}${path}`, { headers: { cookie } });
const today = todayIn("UTC");
const ctx = { context: {} as never };

// Responses are read to the end, as a client would.
const body = async (r: unknown) => (r instanceof Response ? r.text() : r);
const pages: Record<string, () => Promise<unknown>> = {
  roster: async () => body(await roster.loader({ request: get("/coach"), params: {}, ...ctx } as never)),
  board: async () =>
    body(
      await board.loader({
        request: get(`/coach/plans/${planId}/board`),
        params: { planId: String(planId) },
        ...ctx,
      } as never),
    ),
  calendar: async () =>
    body(
      await calendar.loader({
        request: get(`/api/calendar?athleteId=${athleteId}&from=${addDays(today, -42)}&to=${addDays(today, 41)}`),
        params: {},
        ...ctx,
      } as never),
    ),
  feed: async () => buildFeed(athlete),
  "load series": async () =>
    body(
      await load.loader({
        request: get(`/api/athletes/${athleteId}/load?from=${addDays(today, -3 * 365)}&to=${today}`),
        params: { id: String(athleteId) },
        ...ctx,
      } as never),
    ),
};

const sequelize = db();
const original = sequelize.query.bind(sequelize);
let statements = 0;
let rows = 0;
(sequelize as unknown as { query: typeof original }).query = (async (...args: Parameters<typeof original>) => {
  statements++;
  const r = (await original(...args)) as unknown;
  if (Array.isArray(r)) rows += r.length === 2 && Array.isArray(r[0]) ? r[0].length : r.length;
  else if (r) rows += 1;
  return r;
}) as typeof original;

const runs = Number(process.env.STUDIO_RUNS ?? 7);
const out: Record<string, { ms: number; statements: number; rows: number }> = {};
for (const [name, fn] of Object.entries(pages)) {
  statements = rows = 0;
  await fn();
  const once = { statements, rows };
  await fn();
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    await fn();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  out[name] = { ms: times[Math.floor(times.length / 2)], ...once };
}
process.stdout.write(`STUDIO ${JSON.stringify(out)}\n`);
const { closeDb } = await import("~/.server/db");
await closeDb();
