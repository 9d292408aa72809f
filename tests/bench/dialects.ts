/**
 * Board move and rescale on PostgreSQL as ratios to the same operations on SQLite, measured in the same run on
 * this machine. Each database is fresh and built by the real migrations; each side runs in its own process
 * (one database per process). Run: `bash scripts/with-postgres.sh npx tsx tests/bench/dialects.ts`.
 * A report, never a gate.
 */
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { performance } from "node:perf_hooks";

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function measure() {
  process.env.MIGRATE_QUIET = "1";
  process.env.PACEWRIGHT_FAKES = "on";
  process.env.NODE_ENV = "test";
  const { migrator } = await import("../../db/migrator");
  await migrator().up();
  const { hashPassword } = await import("~/.server/auth");
  const { closeDb, writeTransaction } = await import("~/.server/db");
  const { CoachAthlete, PlanItem, PlanWeek, ShelfSession, ShelfBlock, Threshold, User } =
    await import("~/.server/models");
  const { createPlan } = await import("~/.server/services/plans");
  const { applyBoardOp } = await import("~/.server/services/board");
  const { materialize } = await import("~/.server/services/materialize");
  const { saveTest } = await import("~/.server/services/field-tests");
  const { addDays, mondayOf, todayIn } = await import("~/lib/dates");
  const hash = await hashPassword("bench-password-1");
  const coach = await User.create({
    role: "coach",
    email: "dialect.coach@example.test",
    name: "Coach",
    passwordHash: hash,
  });
  const athlete = await User.create({
    role: "athlete",
    email: "dialect.athlete@example.test",
    name: "Athlete",
    passwordHash: hash,
  });
  await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
  await Threshold.create({
    athleteId: athlete.id,
    sport: "bike",
    metric: "power",
    value: 250,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  const s = await ShelfSession.create({ ownerId: coach.id, name: "Bench", sport: "bike" });
  await ShelfBlock.bulkCreate(
    [55, 75, 95, 105, 60, 50].map((pct, position) => ({
      sessionId: s.id,
      position,
      kind: "steady",
      spec: { kind: "steady", durationS: 600, target: { metric: "power", lowPct: pct, highPct: pct + 5 } },
    })),
  );
  const today = todayIn("UTC");
  const plan = await createPlan(coach.id, {
    name: "Bench",
    sport: "bike",
    description: "",
    alignment: "start",
    date: mondayOf(today),
    weeks: 26,
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  await PlanItem.destroy({ where: { planId: plan.id } });
  const weeks = await PlanWeek.findAll({ where: { planId: plan.id }, order: [["idx", "ASC"]] });
  for (const w of weeks)
    for (let d = 0; d < 5; d++)
      await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId: s.id, toWeek: w.id, toDay: d, toIndex: 0 });
  await writeTransaction((transaction) =>
    materialize(plan.id, athlete, mondayOf(today), { assignedBy: coach.id, transaction }),
  );
  const items = (await PlanItem.findAll({ where: { planId: plan.id } })).map((i) => i.id);
  // BENCH_ANALYZE=1: planner statistics for the freshly filled tables first (autovacuum would gather them later).
  if (process.env.BENCH_ANALYZE === "1" && process.env.DATABASE_URL)
    await (await import("~/.server/db")).db().query("ANALYZE");

  const moves: number[] = [];
  for (let k = 0; k < 40; k++) {
    const t0 = performance.now();
    await applyBoardOp(coach.id, plan.id, {
      op: "move",
      itemId: items[k % items.length],
      toWeek: weeks[k % weeks.length].id,
      toDay: k % 7,
      toIndex: 0,
    });
    moves.push(performance.now() - t0);
  }
  const rescales: number[] = [];
  // The last rescale is traced: how many statements (round trips on PostgreSQL) it takes and which cost most.
  const { db } = await import("~/.server/db");
  const trace: { sql: string; ms: number }[] = [];
  for (let k = 0; k < 10; k++) {
    if (k === 9)
      Object.assign((db() as unknown as { options: object }).options, {
        benchmark: true,
        logging: (sql: string, ms: number) =>
          trace.push({ sql: sql.replace(/^Executed \([^)]*\): /, "").slice(0, 160), ms }),
      });
    const t0 = performance.now();
    await saveTest(athlete, athlete, {
      protocol: "manual",
      inputs: { sport: "bike", metric: "power", value: String(255 + k) },
      testedOn: addDays(today, k - 10),
    } as never);
    if (k < 9) rescales.push(performance.now() - t0);
  }
  Object.assign((db() as unknown as { options: object }).options, { benchmark: false, logging: false });
  // A figure only counts if the rescale did its work (each test is newer than the last, so it rescales every future step).
  const { RescaleReport } = await import("~/.server/models");
  const last = await RescaleReport.findOne({ order: [["id", "DESC"]] });
  if (!last || last.blocksChanged === 0) throw new Error("the rescale touched no step");
  const blocksChanged = last.blocksChanged;
  await closeDb();
  const slowest = [...trace]
    .sort((a, b) => b.ms - a.ms)
    .slice(0, 6)
    .map((t) => `${t.ms} ms ${t.sql}`);
  console.log(
    JSON.stringify({
      blocksChanged,
      boardMoveMs: median(moves),
      rescaleMs: median(rescales),
      sessions: weeks.length * 5,
      rescaleStatements: trace.length,
      rescaleStatementMs: trace.reduce((n, t) => n + t.ms, 0),
      slowest,
    }),
  );
}

function side(env: Record<string, string>) {
  const res = spawnSync(
    process.execPath,
    [path.resolve("node_modules/tsx/dist/cli.mjs"), "tests/bench/dialects.ts", "measure"],
    { env: { ...process.env, ...env }, encoding: "utf8" },
  );
  const line = res.stdout.trim().split("\n").pop() ?? "";
  if (res.status !== 0 || !line.startsWith("{")) throw new Error(`bench side failed:\n${res.stdout}\n${res.stderr}`);
  return JSON.parse(line) as {
    blocksChanged: number;
    boardMoveMs: number;
    rescaleMs: number;
    sessions: number;
    rescaleStatements: number;
    rescaleStatementMs: number;
    slowest: string[];
  };
}

async function main() {
  const adminUrl = process.env.TEST_DATABASE_URL;
  if (!adminUrl) throw new Error("Set TEST_DATABASE_URL, or run through scripts/with-postgres.sh.");
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-dialects-"));
  const { default: pg } = await import("pg");
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  const name = `pw_bench_${process.pid}`;
  await admin.query(`CREATE DATABASE ${name} TEMPLATE template0`);
  try {
    const url = new URL(adminUrl);
    url.pathname = `/${name}`;
    const sqlite = side({
      DATABASE_URL: "",
      DATABASE_PATH: path.join(dir, "bench.sqlite"),
      UPLOAD_DIR: path.join(dir, "up"),
    });
    const postgres = side({ DATABASE_URL: url.toString(), UPLOAD_DIR: path.join(dir, "up") });
    const report = {
      machine: `${os.cpus().length} cores`,
      sqlite,
      postgres,
      ratios: { boardMove: postgres.boardMoveMs / sqlite.boardMoveMs, rescale: postgres.rescaleMs / sqlite.rescaleMs },
      note: "median ms of 40 board moves and 9 rescales (field tests) on one athlete with a 26-week plan; PostgreSQL on a local unix socket",
    };
    console.log(JSON.stringify(report, null, 2));
    fs.writeFileSync(path.resolve("tests/bench/dialects.json"), JSON.stringify(report, null, 2) + "\n");
  } finally {
    await admin.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
    await admin.end();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (process.argv[2] === "measure") await measure();
else await main();
