import { QueryTypes } from "sequelize";
import { describe, expect, it } from "vitest";
import { db, dialect, writeTransaction } from "~/.server/db";
import { ScheduledBlock, ScheduledSession } from "~/.server/models";
import { applyThreshold } from "~/.server/services/rescale";
import { resolveTarget } from "~/lib/training";
import { makeUser } from "./helpers";

/**
 * The set-based rescale in SQL must give every step exactly the number the engine computes in JavaScript, on SQLite
 * and on PostgreSQL alike. Reference: ECMAScript's Math.round (round to nearest, halves towards +∞), applied to
 * pct × threshold / 100 (power, heart rate) and threshold ÷ (pct / 100) (pace), in IEEE doubles.
 * The grid holds exact halves (50 % of 361 W = 180.5 W; 200 % of 361 s = 180.5 s), which PostgreSQL's ROUND on
 * double precision rounds to even, and decimals that are not exact in binary.
 */
const PCTS = [50, 55.5, 62.5, 72.3, 75, 87.65, 88.5, 95, 99.9, 100, 104.5, 112.5, 118.3, 120, 150, 175.5, 200];
const VALUES = { power: [361, 287, 250.5, 199], pace: [361, 270, 242.5, 305] } as const;

async function rescaleGrid(metric: "power" | "pace", value: number) {
  const athlete = await makeUser({ role: "athlete" });
  const sport = metric === "power" ? "bike" : "run";
  const unit = metric === "power" ? "W" : "s/km";
  const session = await ScheduledSession.create({ athleteId: athlete.id, date: "2027-03-01", name: "Grid", sport });
  let position = 0;
  for (const low of PCTS) {
    for (const high of [low, low + 2.5]) {
      await ScheduledBlock.create({
        scheduledSessionId: session.id,
        athleteId: athlete.id,
        date: "2027-03-01",
        sport,
        position: position++,
        blockIndex: 0,
        kind: "steady",
        part: "work",
        rep: null,
        repCount: null,
        durationS: 60,
        metric,
        lowPct: low,
        highPct: high,
        ramp: false,
        lowAbs: null,
        highAbs: null,
        unit: null,
        thresholdId: null,
        thresholdValue: null,
        cue: null,
        cadence: null,
      });
    }
  }
  await writeTransaction((transaction) =>
    applyThreshold(
      { athleteId: athlete.id, sport, metric, value, unit, from: "2027-01-01", fieldTestId: null, createdBy: null },
      transaction,
    ),
  );
  return ScheduledBlock.findAll({ where: { scheduledSessionId: session.id }, order: [["position", "ASC"]] });
}

describe(`rescale rounding on ${dialect()}`, () => {
  for (const metric of ["power", "pace"] as const) {
    for (const value of VALUES[metric]) {
      it(`${metric} at threshold ${value}: every step equals the JavaScript result`, async () => {
        const rows = await rescaleGrid(metric, value);
        expect(rows).toHaveLength(PCTS.length * 2);
        const mismatches = rows.flatMap((b) => {
          const direct = (pct: number) =>
            metric === "pace" ? Math.round(value / (pct / 100)) : Math.round((pct * value) / 100);
          const engine = resolveTarget({ metric, lowPct: b.lowPct!, highPct: b.highPct! }, value);
          const expected = [direct(b.lowPct!), direct(b.highPct!)];
          expect([engine.low, engine.high]).toEqual(expected);
          return b.lowAbs === expected[0] && b.highAbs === expected[1]
            ? []
            : [`${b.lowPct}–${b.highPct} %: got ${b.lowAbs}–${b.highAbs}, want ${expected.join("–")}`];
        });
        expect(mismatches).toEqual([]);
        if (value === 361) {
          // The exact half is in the grid, and lands upwards.
          const half = rows.find((b) => b.lowPct === (metric === "pace" ? 200 : 50))!;
          expect(half.lowAbs).toBe(181);
        }
      });
    }
  }

  it.runIf(dialect() === "postgres")(
    "shows why: PostgreSQL's ROUND on double precision takes a half to even",
    async () => {
      const [row] = await db().query<{ r: number }>("SELECT ROUND(CAST(180.5 AS DOUBLE PRECISION)) AS r", {
        type: QueryTypes.SELECT,
      });
      expect(Number(row.r)).toBe(180);
    },
  );
});
