import { QueryTypes } from "sequelize";
import { hashPassword } from "~/.server/auth";
import { db, writeTransaction } from "~/.server/db";
import {
  CoachAthlete,
  PlanItem,
  PlanWeek,
  ScheduledBlock,
  ShelfSession,
  ShelfBlock,
  Threshold,
  User,
} from "~/.server/models";
import { calendarRange } from "~/.server/services/calendar";
import { materialize, resolveSteps } from "~/.server/services/materialize";
import { loadBoard } from "~/.server/services/board";
import { createPlan } from "~/.server/services/plans";
import { thresholdHistory } from "~/.server/services/thresholds";
import { addDays } from "~/lib/dates";
import { expandBlocks, type Block } from "~/lib/training";
import { compare, compareEach, round, type BenchFigure } from "./lib";
import { pageHandler, signedIn } from "./pages";
import { countStatements } from "./statements";

/**
 * A 52-week plan, 8 sessions a week, 6 blocks each. Each path is measured against a baseline that does the same
 * essential work with raw SQL: reading the same rows (board, calendar) or inserting the same rows in multi-row
 * INSERTs (placing the plan on a calendar).
 */
export async function run(): Promise<BenchFigure[]> {
  const hash = await hashPassword("bench-password-1");
  const coach = await User.create({
    role: "coach",
    email: "board.bench@example.test",
    name: "Board Bench",
    passwordHash: hash,
  });
  const athletes: User[] = [];
  for (let i = 0; i < 12; i++) {
    const a = await User.create({
      role: "athlete",
      email: `board.athlete${i}@example.test`,
      name: `Board Athlete ${i}`,
      passwordHash: hash,
    });
    await CoachAthlete.create({ coachId: coach.id, athleteId: a.id });
    await Threshold.create({
      athleteId: a.id,
      sport: "bike",
      metric: "power",
      value: 260,
      unit: "W",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });
    athletes.push(a);
  }
  const blocks: Block[] = [
    { kind: "warmup", durationS: 600, target: { metric: "power", lowPct: 50, highPct: 65 } },
    { kind: "steady", durationS: 900, target: { metric: "power", lowPct: 70, highPct: 75 } },
    {
      kind: "repeats",
      count: 4,
      work: { durationS: 300, target: { metric: "power", lowPct: 105, highPct: 110 } },
      recovery: { durationS: 180, target: { metric: "power", lowPct: 50 } },
    },
    { kind: "ramp", durationS: 300, metric: "power", fromPct: 70, toPct: 95 },
    { kind: "open", durationS: 300, cue: "Spin" },
    { kind: "cooldown", durationS: 600, target: { metric: "power", lowPct: 45, highPct: 55 } },
  ] as Block[];
  const session = await ShelfSession.create({ ownerId: coach.id, name: "Bench session", sport: "bike" });
  await ShelfBlock.bulkCreate(
    blocks.map((spec, position) => ({ sessionId: session.id, position, kind: spec.kind, spec })),
  );
  const plan = await createPlan(coach.id, {
    name: "Bench 52",
    sport: "bike",
    description: "",
    alignment: "start",
    date: "2027-01-04",
    weeks: 52,
    weeklyHours: 10,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  const weeks = await PlanWeek.findAll({ where: { planId: plan.id } });
  await PlanItem.destroy({ where: { planId: plan.id } });
  await PlanItem.bulkCreate(
    weeks.flatMap((w) =>
      Array.from({ length: 8 }, (_, k) => ({
        planId: plan.id,
        weekId: w.id,
        day: k % 7,
        position: Math.floor(k / 7),
        sourceSessionId: session.id,
        name: `S${k}`,
        sport: "bike",
        blocks,
      })),
    ),
  );
  const itemCount = weeks.length * 8;
  const stepsPerSession = expandBlocks(blocks).length;

  // Board: the plan, its weeks and items with their blocks, read and decoded — what the loader must do at least.
  const rawBoard = async () => {
    const q = (sql: string) =>
      db().query<Record<string, unknown>>(sql, { replacements: [plan.id], type: QueryTypes.SELECT });
    const [p, w, items] = await Promise.all([
      q("SELECT * FROM season_plans WHERE id = ?"),
      q("SELECT * FROM plan_weeks WHERE plan_id = ? ORDER BY idx"),
      q("SELECT * FROM plan_items WHERE plan_id = ? ORDER BY day, position"),
    ]);
    return { p, w, items: items.map((i) => ({ ...i, blocks: JSON.parse(String(i.blocks)) })) };
  };
  const figures: BenchFigure[] = [
    await compare(
      `board loader, 52 weeks × 8 sessions × ${blocks.length} blocks`,
      () => loadBoard(coach, plan.id),
      rawBoard,
      {
        baselineName: "raw reads of the same plan, week and item rows with blocks decoded",
        runs: 9,
        aim: 3,
        note: "the board page's loader service alone (cards, distinct shapes with load and minutes per band), without rendering",
      },
    ),
  ];

  // The whole board page: every loader of the route tree (session, layout, board) and the HTML with its data. The
  // baseline is the route that reads the same rows and answers JSON (the board's own resource route), through the
  // same built server with the same session.
  if (await pageHandler()) {
    const get = await signedIn(coach);
    const url = `/coach/plans/${plan.id}/board`;
    const page = await get(url);
    // BENCH_DUMP=<file> keeps the page's HTML, to see what it is made of.
    if (process.env.BENCH_DUMP) (await import("node:fs")).writeFileSync(process.env.BENCH_DUMP, page.body);
    const jsonRoute = `/api/plans/${plan.id}/items`;
    const json = await get(jsonRoute);
    const fig = await compare(
      `board page, 52 weeks × 8 sessions, HTML + data`,
      () => get(url),
      () => get(jsonRoute),
      {
        baselineName:
          "the plan's JSON route through the same server: session, plan, weeks and items with blocks, as JSON",
        runs: 9,
        aim: 3,
      },
    );
    const kb = Math.round(page.bytes / 1024);
    fig.note = `HTML ${kb} kB (aim ≤ 80 kB: ${kb <= 80 ? "meets" : "misses"}); the JSON route answers ${Math.round(json.bytes / 1024)} kB`;
    figures.push(fig, {
      name: "board page HTML, 52 weeks × 8 sessions: kB against the 80 kB aim",
      subjectMs: round(page.bytes / 1024),
      baselineMs: 80,
      baseline: "the issue's 80 kB budget",
      ratio: round(page.bytes / 1024 / 80),
      aim: 1,
      note: "sizes in kB (uncompressed), not times; everything the browser gets in the HTML, page data included",
    });
  }

  // Placing the plan: each run uses a fresh athlete, so every calendar holds the plan once. The baseline inserts the
  // same resolved rows (computed untimed) with one multi-row INSERT per 500 rows, in one transaction.
  const history = await thresholdHistory(athletes[0].id);
  const sessionRows = weeks.flatMap((w) =>
    Array.from({ length: 8 }, (_, k) => ({
      date: addDays("2027-01-04", (w.idx - 1) * 7 + (k % 7)),
      position: Math.floor(k / 7),
      name: `S${k}`,
    })),
  );
  let statements = 0;
  let next = 0;
  const place = await compareEach(
    `place a ${itemCount}-session plan (${itemCount * stepsPerSession} steps) on one calendar`,
    async () => {
      const athlete = athletes[next++];
      const raw = athletes[next++];
      return {
        subject: async () => {
          const counted = await countStatements(() =>
            writeTransaction((transaction) =>
              materialize(plan.id, athlete, "2027-01-04", { assignedBy: coach.id, transaction }),
            ),
          );
          statements = counted.statements;
        },
        baseline: () =>
          writeTransaction(async (transaction) => {
            const now = new Date().toISOString();
            const ids: number[] = [];
            for (let i = 0; i < sessionRows.length; i += 500) {
              const chunk = sessionRows.slice(i, i + 500);
              await db().query(
                `INSERT INTO scheduled_sessions (athlete_id, date, position, name, sport, status, planned_duration_s, created_at, updated_at) VALUES ${chunk.map(() => "(?, ?, ?, ?, 'bike', 'planned', 3600, ?, ?)").join(", ")}`,
                { replacements: chunk.flatMap((s) => [raw.id, s.date, s.position, s.name, now, now]), transaction },
              );
            }
            // Rows of one multi-row INSERT get consecutive ids; reading them back stands in for RETURNING.
            const got = await db().query<{ id: number }>(
              "SELECT id FROM scheduled_sessions WHERE athlete_id = ? ORDER BY id",
              { replacements: [raw.id], type: QueryTypes.SELECT, transaction },
            );
            ids.push(...got.map((r) => r.id));
            const steps = sessionRows.flatMap((s, i) =>
              resolveSteps(blocks, { athleteId: raw.id, date: s.date, sport: "bike", history }).map((r) => ({
                ...r,
                scheduledSessionId: ids[i],
              })),
            );
            const cols = [
              "scheduled_session_id",
              "athlete_id",
              "date",
              "sport",
              "position",
              "block_index",
              "kind",
              "part",
              "rep",
              "rep_count",
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
              "cue",
              "cadence",
            ];
            for (let i = 0; i < steps.length; i += 40) {
              const chunk = steps.slice(i, i + 40);
              await db().query(
                `INSERT INTO scheduled_blocks (${cols.join(", ")}) VALUES ${chunk.map(() => `(${cols.map(() => "?").join(", ")})`).join(", ")}`,
                {
                  replacements: chunk.flatMap((r) => [
                    r.scheduledSessionId,
                    r.athleteId,
                    r.date,
                    r.sport,
                    r.position,
                    r.blockIndex,
                    r.kind,
                    r.part,
                    r.rep ?? null,
                    r.repCount ?? null,
                    r.durationS,
                    r.metric ?? null,
                    r.lowPct ?? null,
                    r.highPct ?? null,
                    r.ramp ? 1 : 0,
                    r.lowAbs ?? null,
                    r.highAbs ?? null,
                    r.unit ?? null,
                    r.thresholdId ?? null,
                    r.thresholdValue ?? null,
                    r.cue ?? null,
                    r.cadence ?? null,
                  ]),
                  transaction,
                },
              );
            }
          }),
      };
    },
    { baselineName: "multi-row INSERTs of the same session and step rows", runs: 5, aim: 2 },
  );
  place.note = `${statements} SQL statements (aim ≤ 30)`;
  figures.push(place);

  const athlete = athletes[0];
  const to = addDays("2027-03-01", 83);
  const placedSteps = await ScheduledBlock.count({ where: { athleteId: athlete.id } });
  const rawCalendar = () =>
    db().query(
      `SELECT s.*, b.* FROM scheduled_sessions s LEFT JOIN scheduled_blocks b ON b.scheduled_session_id = s.id
       WHERE s.athlete_id = ? AND s.date BETWEEN ? AND ? ORDER BY s.date, s.position, b.position`,
      { replacements: [athlete.id, "2027-03-01", to], type: QueryTypes.SELECT },
    );
  figures.push(
    await compare("calendar JSON, 12 weeks", () => calendarRange(athlete.id, "2027-03-01", to), rawCalendar, {
      baselineName: "one raw join of the same session and step rows",
      runs: 15,
      aim: 3,
      note: `athlete holds ${placedSteps} placed steps in all`,
    }),
  );
  return figures;
}
