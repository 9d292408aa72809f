/**
 * Writes a large, reproducible studio into its own SQLite file, for benchmarks on a realistic volume:
 *
 *   npm run studio -- --seed 42 --athletes 500 --years 5 --db /tmp/studio.sqlite
 *
 * Coaches (one per 25 athletes), athletes, a threshold history per athlete (a retest every 6–10 weeks), five sessions
 * a week over the years before today and twelve weeks after it, with their steps resolved against the threshold in
 * force; past sessions are done rides with minutes, effort and load. Each coach has a 52-week plan with 8 sessions a
 * week assigned to their athletes. The same seed gives the same studio (relative to the Monday of the current week).
 * Rows go in as multi-row INSERTs inside one transaction per table chunk. It refuses the demo database and any
 * existing file unless `--force` is given.
 */
import fs from "node:fs";
import path from "node:path";

function arg(name: string, fallback?: string): string {
  const i = process.argv.indexOf(`--${name}`);
  if (i >= 0 && process.argv[i + 1] !== undefined) return process.argv[i + 1];
  if (fallback === undefined) throw new Error(`--${name} is required`);
  return fallback;
}

export interface StudioOptions {
  seed: number;
  athletes: number;
  years: number;
  db: string;
}

/** Bumped whenever the generated content changes, so cached studio files are rebuilt. */
export const STUDIO_VERSION = 1;

/** mulberry32: a small seeded PRNG (common practice; public-domain algorithm by Tommy Ettinger). */
function prng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const SESSIONS = [
  { name: "Endurance ride", minutes: 90, main: [62, 72] },
  { name: "Tempo blocks", minutes: 75, main: [80, 88] },
  { name: "Threshold intervals", minutes: 70, main: [95, 102] },
  { name: "VO2 repeats", minutes: 60, main: [110, 120] },
  { name: "Recovery spin", minutes: 45, main: [45, 55] },
  { name: "Long ride", minutes: 180, main: [60, 70] },
];
const DAYS_OF_WEEK = [0, 1, 3, 4, 5];

const DEMO_DATABASE = path.resolve("db/data/pacewright.sqlite");

export async function generateStudio(o: StudioOptions) {
  const target = path.resolve(o.db);
  if (target === DEMO_DATABASE) throw new Error("Refusing to write the studio into the demo database.");
  process.env.DATABASE_PATH = target;
  process.env.MIGRATE_QUIET = "1";
  delete process.env.DATABASE_URL;
  const { migrator } = await import("../db/migrator");
  const { db, sqlDate, writeTransaction } = await import("../app/.server/db");
  const { hashPassword } = await import("../app/.server/auth");
  const { addDays, mondayOf, todayIn } = await import("../app/lib/dates");
  await migrator().up();

  const rand = prng(o.seed);
  const int = (lo: number, hi: number) => lo + Math.floor(rand() * (hi - lo + 1));
  const today = todayIn("UTC");
  const monday = mondayOf(today);
  const first = addDays(monday, -Math.round(o.years * 52) * 7);
  const last = addDays(monday, 12 * 7 - 1);
  const now = sqlDate(new Date());
  const hash = await hashPassword("studio-password-1");

  /** Multi-row INSERT of `rows` (arrays in `cols` order), `per` rows a statement, in one transaction per 20 statements. */
  async function insert(
    table: string,
    cols: string[],
    rows: unknown[][],
    per = Math.max(1, Math.floor(30000 / cols.length)),
  ) {
    const statements: unknown[][][] = [];
    for (let i = 0; i < rows.length; i += per) statements.push(rows.slice(i, i + per));
    for (let i = 0; i < statements.length; i += 20) {
      await writeTransaction(async (transaction) => {
        for (const chunk of statements.slice(i, i + 20)) {
          await db().query(
            `INSERT INTO ${table} (${cols.join(", ")}) VALUES ${chunk.map(() => `(${cols.map(() => "?").join(", ")})`).join(", ")}`,
            { replacements: chunk.flat(), transaction },
          );
        }
      });
    }
  }
  const firstId = async (table: string, where: string, value: unknown) => {
    const [row] = await db().query<{ id: number }>(`SELECT MIN(id) AS id FROM ${table} WHERE ${where} = ?`, {
      replacements: [value],
      type: "SELECT" as never,
    });
    return Number(row.id);
  };

  // People.
  const coachCount = Math.max(1, Math.ceil(o.athletes / 25));
  const tag = `s${o.seed}`;
  await insert(
    "users",
    ["role", "email", "password_hash", "name", "timezone", "units", "created_at", "updated_at"],
    [
      ...Array.from({ length: coachCount }, (_, i) => [
        "coach",
        `coach${i + 1}.${tag}@studio.test`,
        hash,
        `Coach ${i + 1}`,
        "UTC",
        "metric",
        now,
        now,
      ]),
      ...Array.from({ length: o.athletes }, (_, i) => [
        "athlete",
        `athlete${i + 1}.${tag}@studio.test`,
        hash,
        `Athlete ${String(i + 1).padStart(3, "0")}`,
        "UTC",
        "metric",
        now,
        now,
      ]),
    ],
  );
  const coach1 = await firstId("users", "role", "coach");
  const athlete1 = await firstId("users", "role", "athlete");
  const coachOf = (a: number) => coach1 + (a % coachCount);
  await insert(
    "coach_athletes",
    ["coach_id", "athlete_id", "created_at", "updated_at"],
    Array.from({ length: o.athletes }, (_, a) => [coachOf(a), athlete1 + a, now, now]),
  );

  // Threshold history: a first value at the start, then a retest every 6–10 weeks drifting by a few per cent.
  const history: { athlete: number; from: string; value: number }[][] = [];
  const thresholdRows: unknown[][] = [];
  for (let a = 0; a < o.athletes; a++) {
    const mine: { athlete: number; from: string; value: number }[] = [];
    let value = int(190, 320);
    for (let d = first; d <= today; d = addDays(d, int(6, 10) * 7)) {
      mine.push({ athlete: athlete1 + a, from: d, value });
      thresholdRows.push([athlete1 + a, "bike", "power", value, "W", d, "manual", now, now]);
      value = Math.max(150, Math.round(value * (1 + (rand() - 0.45) * 0.06)));
    }
    history.push(mine);
  }
  await insert(
    "thresholds",
    ["athlete_id", "sport", "metric", "value", "unit", "effective_from", "source", "created_at", "updated_at"],
    thresholdRows,
  );
  const [{ id: threshold1 }] = await db().query<{ id: number }>("SELECT MIN(id) AS id FROM thresholds", {
    type: "SELECT" as never,
  });

  // Plans: one 52-week plan per coach, 8 sessions a week, assigned to the coach's athletes (placement is not part of
  // the studio: its sessions are the ones below).
  const { createPlan } = await import("../app/.server/services/plans");
  const blocksOf = (s: (typeof SESSIONS)[number]) => [
    { kind: "warmup", durationS: 900, target: { metric: "power", lowPct: 50, highPct: 65 } },
    {
      kind: "steady",
      durationS: (s.minutes - 25) * 60,
      target: { metric: "power", lowPct: s.main[0], highPct: s.main[1] },
    },
    { kind: "cooldown", durationS: 600, target: { metric: "power", lowPct: 45, highPct: 55 } },
  ];
  const planIds: number[] = [];
  for (let c = 0; c < coachCount; c++) {
    const plan = await createPlan(coach1 + c, {
      name: `Season ${c + 1}`,
      sport: "bike",
      description: "",
      alignment: "start",
      date: monday,
      weeks: 52,
      weeklyHours: 9,
      pattern: "3:1",
      testEveryWeeks: 8,
    });
    planIds.push(plan.id);
    const weeks = await db().query<{ id: number }>("SELECT id FROM plan_weeks WHERE plan_id = ? ORDER BY idx", {
      replacements: [plan.id],
      type: "SELECT" as never,
    });
    await db().query("DELETE FROM plan_items WHERE plan_id = ?", { replacements: [plan.id] });
    await insert(
      "plan_items",
      [
        "plan_id",
        "week_id",
        "day",
        "position",
        "name",
        "sport",
        "blocks",
        "notes",
        "description",
        "created_at",
        "updated_at",
      ],
      weeks.flatMap((w) =>
        Array.from({ length: 8 }, (_, k) => {
          const s = SESSIONS[int(0, SESSIONS.length - 1)];
          return [
            plan.id,
            w.id,
            k % 7,
            Math.floor(k / 7),
            s.name,
            "bike",
            JSON.stringify(blocksOf(s)),
            "",
            "",
            now,
            now,
          ];
        }),
      ),
    );
  }
  await insert(
    "assignments",
    ["plan_id", "athlete_id", "start_date", "plan_version", "created_at", "updated_at"],
    Array.from({ length: o.athletes }, (_, a) => [planIds[a % coachCount], athlete1 + a, monday, 1, now, now]),
  );

  // Sessions and their steps, athlete by athlete so memory stays flat.
  const sessionCols = [
    "athlete_id",
    "date",
    "position",
    "name",
    "sport",
    "notes",
    "planned_duration_s",
    "planned_load",
    "status",
    "effort_score",
    "actual_minutes",
    "completed_at",
    "trimp",
    "work_kj",
    "feed_sequence",
    "description",
    "created_at",
    "updated_at",
  ];
  const stepCols = [
    "scheduled_session_id",
    "athlete_id",
    "date",
    "sport",
    "position",
    "block_index",
    "kind",
    "part",
    "duration_s",
    "metric",
    "low_pct",
    "high_pct",
    "ramp",
    "low_abs",
    "high_abs",
    "unit",
    "threshold_id",
    "threshold_value",
  ];
  let thresholdIndex = Number(threshold1);
  let sessions = 0;
  let steps = 0;
  for (let a = 0; a < o.athletes; a++) {
    const athleteId = athlete1 + a;
    const mine = history[a];
    const rows: unknown[][] = [];
    const planned: { date: string; s: (typeof SESSIONS)[number]; t: number }[] = [];
    let t = 0;
    for (let week = first; week <= last; week = addDays(week, 7)) {
      for (const day of DAYS_OF_WEEK) {
        if (rand() < 0.1) continue;
        const date = addDays(week, day === 5 && rand() < 0.5 ? 5 : day);
        while (t + 1 < mine.length && mine[t + 1].from <= date) t++;
        const s = day === 5 ? SESSIONS[5] : SESSIONS[int(0, 4)];
        const load = Math.round(s.minutes * ((s.main[0] + s.main[1]) / 200) * 5);
        const past = date < today;
        const done = past && rand() < 0.85;
        const minutes = done ? Math.round(s.minutes * (0.85 + rand() * 0.3)) : null;
        rows.push([
          athleteId,
          date,
          0,
          s.name,
          "bike",
          "",
          s.minutes * 60,
          load,
          done ? "done" : past ? "skipped" : "planned",
          done ? int(3, 9) : null,
          minutes,
          done ? sqlDate(new Date(`${date}T18:00:00Z`)) : null,
          done ? Math.round(minutes! * (1 + rand())) : null,
          done ? Math.round(minutes! * mine[t].value * 0.042) : null,
          0,
          "",
          now,
          now,
        ]);
        planned.push({ date, s, t });
      }
    }
    await insert("scheduled_sessions", sessionCols, rows);
    const [{ id: firstSession }] = await db().query<{ id: number }>(
      "SELECT MIN(id) AS id FROM scheduled_sessions WHERE athlete_id = ?",
      { replacements: [athleteId], type: "SELECT" as never },
    );
    const stepRows = planned.flatMap((p, i) =>
      blocksOf(p.s).map((b, k) => {
        const th = mine[p.t];
        return [
          Number(firstSession) + i,
          athleteId,
          p.date,
          "bike",
          k,
          k,
          b.kind,
          "main",
          b.durationS,
          "power",
          b.target.lowPct,
          b.target.highPct,
          false,
          Math.round((b.target.lowPct / 100) * th.value),
          Math.round((b.target.highPct / 100) * th.value),
          "W",
          thresholdIndex + p.t,
          th.value,
        ];
      }),
    );
    await insert("scheduled_blocks", stepCols, stepRows);
    thresholdIndex += mine.length;
    sessions += rows.length;
    steps += stepRows.length;
  }
  return {
    coaches: coachCount,
    athletes: o.athletes,
    thresholds: thresholdRows.length,
    sessions,
    steps,
    plans: planIds.length,
    from: first,
    to: last,
  };
}

if (process.argv[1] && path.resolve(process.argv[1]) === path.resolve(new URL(import.meta.url).pathname)) {
  const db = arg("db");
  if (path.resolve(db) === DEMO_DATABASE) {
    console.error("Refusing to write the studio into the demo database; give another file.");
    process.exit(1);
  }
  if (fs.existsSync(db) && !process.argv.includes("--force")) {
    console.error(`${db} exists; pass --force to replace it.`);
    process.exit(1);
  }
  fs.rmSync(db, { force: true });
  const t0 = Date.now();
  const made = await generateStudio({
    seed: Number(arg("seed", "42")),
    athletes: Number(arg("athletes", "500")),
    years: Number(arg("years", "5")),
    db,
  });
  console.log(`studio written to ${db} in ${((Date.now() - t0) / 1000).toFixed(1)} s:`, made);
  const { closeDb } = await import("../app/.server/db");
  await closeDb();
}
