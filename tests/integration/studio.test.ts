import { execFileSync } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import sqlite3 from "sqlite3";
import { afterAll, describe, expect, it } from "vitest";

// The generator runs as its own process (as `npm run studio` does), each time into a fresh file of its own.
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-studio-test-"));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

function generate(file: string, seed: number, extra: string[] = []) {
  return execFileSync(
    process.execPath,
    [
      "--import",
      "tsx",
      "scripts/studio.ts",
      "--seed",
      String(seed),
      "--athletes",
      "3",
      "--years",
      "1",
      "--db",
      file,
      ...extra,
    ],
    {
      encoding: "utf8",
      env: { ...process.env, DATABASE_URL: "", MIGRATE_QUIET: "1" },
      stdio: ["ignore", "pipe", "pipe"],
    },
  );
}

function all(file: string, sql: string): Promise<Record<string, unknown>[]> {
  const d = new sqlite3.Database(file, sqlite3.OPEN_READONLY);
  return new Promise((resolve, reject) =>
    d.all(sql, (err, rows) => d.close(() => (err ? reject(err) : resolve(rows as Record<string, unknown>[])))),
  );
}

/** A digest of what the studio holds, leaving out the clock (timestamps) and password salts. */
async function digest(file: string) {
  const parts = await Promise.all([
    all(file, "SELECT role, email, name FROM users ORDER BY id"),
    all(file, "SELECT athlete_id, value, effective_from FROM thresholds ORDER BY id"),
    all(
      file,
      "SELECT athlete_id, date, name, status, effort_score, actual_minutes, planned_load, trimp, work_kj FROM scheduled_sessions ORDER BY id",
    ),
    all(
      file,
      "SELECT scheduled_session_id, position, low_abs, high_abs, threshold_id FROM scheduled_blocks ORDER BY id",
    ),
    all(file, "SELECT week_id, day, position, name, blocks FROM plan_items ORDER BY id"),
  ]);
  return crypto.createHash("sha256").update(JSON.stringify(parts)).digest("hex");
}

describe("studio generator", () => {
  it("writes the same studio for the same seed and another for another seed, with steps resolved from the threshold in force", async () => {
    const [a, b, c] = ["a", "b", "c"].map((n) => path.join(dir, `${n}.sqlite`));
    generate(a, 7);
    generate(b, 7);
    generate(c, 8);
    expect(await digest(a)).toBe(await digest(b));
    expect(await digest(a)).not.toBe(await digest(c));

    const [counts] = await all(
      a,
      "SELECT (SELECT COUNT(*) FROM users WHERE role = 'athlete') AS athletes, (SELECT COUNT(*) FROM users WHERE role = 'coach') AS coaches, (SELECT COUNT(*) FROM scheduled_sessions) AS sessions, (SELECT COUNT(*) FROM scheduled_sessions WHERE status = 'done') AS done",
    );
    expect(counts.athletes).toBe(3);
    expect(counts.coaches).toBe(1);
    // 5 training days a week, about 1 in 10 left out, over 52 + 12 weeks.
    expect(Number(counts.sessions)).toBeGreaterThan(3 * 64 * 5 * 0.8);
    expect(Number(counts.done)).toBeGreaterThan(0);
    // Every step points at the athlete's own threshold that was in force on the session's date (the latest one
    // effective on or before it), and its watts are that threshold times the step's per cent.
    const wrong = await all(
      a,
      `SELECT b.id FROM scheduled_blocks b JOIN thresholds t ON t.id = b.threshold_id
       WHERE t.athlete_id <> b.athlete_id OR t.effective_from > b.date OR b.threshold_value <> t.value
          OR b.low_abs <> CAST(ROUND(b.low_pct / 100.0 * t.value) AS INTEGER)
          OR EXISTS (SELECT 1 FROM thresholds n WHERE n.athlete_id = t.athlete_id AND n.effective_from > t.effective_from AND n.effective_from <= b.date)`,
    );
    expect(wrong).toEqual([]);
  }, 120_000);

  it("refuses an existing file without --force, and the demo database", () => {
    const file = path.join(dir, "exists.sqlite");
    fs.writeFileSync(file, "");
    expect(() => generate(file, 1)).toThrow(/exists; pass --force/);
    expect(() => generate(path.resolve("db/data/pacewright.sqlite"), 1, ["--force"])).toThrow(/demo database/);
  });
});
