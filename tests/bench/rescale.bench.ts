import { performance } from "node:perf_hooks";
import { QueryTypes } from "sequelize";
import { hashPassword } from "~/.server/auth";
import { db } from "~/.server/db";
import { Threshold, User } from "~/.server/models";
import { saveTest } from "~/.server/services/field-tests";
import { todayIn } from "~/lib/dates";
import Papa from "papaparse";
import { bestEffort, pacingSplits, parseActivity } from "~/lib/training";
import { enduranceRide, toCsv } from "../../db/demo/rides";
import { compare, type BenchFigure } from "./lib";

/**
 * Rescaling 20,000 future steps through the app (saveTest: test, threshold, report, undo base, update, sequences)
 * against one raw SQL UPDATE of the same rows and columns on the same database, alternating in one run. The steps
 * start as the app leaves them: resolved against the threshold they point at.
 */
export async function run(): Promise<BenchFigure[]> {
  const athlete = await User.create({
    role: "athlete",
    email: "rescale.bench@example.test",
    name: "Rescale Bench",
    passwordHash: await hashPassword("bench-password-1"),
  });
  const first = await Threshold.create({
    athleteId: athlete.id,
    sport: "bike",
    metric: "power",
    value: 250,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  const now = new Date().toISOString();
  const sessions = 2000;
  await db().query("BEGIN IMMEDIATE");
  for (let i = 0; i < sessions; i++) {
    const date = new Date(Date.UTC(2027, 0, 1) + Math.floor(i / 4) * 86_400_000).toISOString().slice(0, 10);
    await db().query(
      "INSERT INTO scheduled_sessions (athlete_id, date, name, sport, status, created_at, updated_at) VALUES (?, ?, 'S', 'bike', 'planned', ?, ?)",
      { replacements: [athlete.id, date, now, now] },
    );
  }
  await db().query(
    `INSERT INTO scheduled_blocks (scheduled_session_id, athlete_id, date, sport, position, block_index, kind, part, duration_s, metric, low_pct, high_pct, ramp, low_abs, high_abs, unit, threshold_id, threshold_value)
     WITH RECURSIVE k(n) AS (SELECT 0 UNION ALL SELECT n + 1 FROM k WHERE n < 9)
     SELECT s.id, s.athlete_id, s.date, 'bike', k.n, k.n, 'steady', 'main', 300, 'power', 60 + k.n * 5, 65 + k.n * 5, 0,
       CAST(ROUND((60 + k.n * 5) * 250 / 100.0) AS INTEGER), CAST(ROUND((65 + k.n * 5) * 250 / 100.0) AS INTEGER), 'W', ?, 250
     FROM scheduled_sessions s, k WHERE s.athlete_id = ?`,
    { replacements: [first.id, athlete.id] },
  );
  await db().query("COMMIT");
  const [{ n }] = await db().query<{ n: number }>("SELECT COUNT(*) AS n FROM scheduled_blocks WHERE athlete_id = ?", {
    replacements: [athlete.id],
    type: QueryTypes.SELECT,
  });

  const testedOn = todayIn(athlete.timezone);
  const app: number[] = [];
  const raw: number[] = [];
  for (let i = 0; i < 5; i++) {
    const value = 260 + i;
    let t0 = performance.now();
    await saveTest(athlete, athlete, {
      protocol: "manual",
      inputs: { sport: "bike", metric: "power", value: String(value) },
      testedOn,
    });
    app.push(performance.now() - t0);
    t0 = performance.now();
    await db().query(
      // The same columns a rescale must write: both targets and the threshold they now follow (id and value). The
      // steps point at the app's newest threshold here, so the id really changes, index entries included.
      "UPDATE scheduled_blocks SET low_abs = CAST(ROUND(low_pct * ? / 100.0) AS INTEGER), high_abs = CAST(ROUND(high_pct * ? / 100.0) AS INTEGER), threshold_id = ?, threshold_value = ? WHERE athlete_id = ? AND metric = 'power' AND date >= ?",
      { replacements: [value, value, first.id, value, athlete.id, testedOn] },
    );
    raw.push(performance.now() - t0);
  }
  const med = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
  const figures: BenchFigure[] = [
    {
      name: `rescale ${n} future steps through the app`,
      subjectMs: Math.round(med(app)),
      baselineMs: Math.round(med(raw)),
      baseline: "raw SQL UPDATE of the same rows and columns (targets, threshold id and value)",
      ratio: Math.round((med(app) / med(raw)) * 100) / 100,
      aim: 3,
      note: "the app also writes the test, the threshold, the report and its undo base, copies the steps that could not be recomputed (none here: every step held its threshold's numbers), bumps feed sequences and queues the e-mail; runs alternate",
    },
  ];
  // Upload to proposal for a two-hour file: parse, then the 20-minute best and its pacing, against papaparse alone.
  const csv = toCsv(enduranceRide());
  figures.push(
    await compare(
      "2-hour file: parse and find the 20-minute proposal",
      () => {
        const a = parseActivity(csv, "ride.csv");
        const best = bestEffort(a.samples, 1200);
        return pacingSplits(a.samples, best.startS, 1200);
      },
      () => Papa.parse(csv),
      { baselineName: "papaparse raw parse of the CSV", runs: 9 },
    ),
  );
  return figures;
}
