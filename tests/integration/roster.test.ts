import { describe, expect, it } from "vitest";
import { CoachAthlete, FieldTest, ScheduledSession, Threshold } from "~/.server/models";
import { rosterLoad } from "~/.server/services/load-figures";
import { retestStatus } from "~/.server/services/retests";
import { rosterFor } from "~/.server/services/roster";
import { currentThresholds } from "~/.server/services/thresholds";
import { addDays, todayIn } from "~/lib/dates";
import { countStatements } from "../bench/statements";
import { makeUser } from "./helpers";

/**
 * The set-based roster must say exactly what the per-athlete functions (used by the athlete's own pages) say:
 * thresholds in force, retest due, compliance and the load ratio — for athletes in different time zones, with
 * and without history, tests and plans.
 */
describe("roster read set-based", () => {
  it("agrees with the per-athlete figures for every athlete, in a handful of statements", async () => {
    const coach = await makeUser({ role: "coach" });
    const zones = ["UTC", "Pacific/Auckland", "America/Los_Angeles", "Europe/Madrid"];
    const athletes = [];
    for (let i = 0; i < 8; i++) {
      const a = await makeUser({
        role: "athlete",
        timezone: zones[i % zones.length],
        name: `Roster ${String.fromCharCode(72 - i)}`,
      });
      await CoachAthlete.create({ coachId: coach.id, athleteId: a.id });
      athletes.push(a);
      const today = todayIn(a.timezone);
      if (i % 2 === 0)
        await Threshold.create({
          athleteId: a.id,
          sport: "bike",
          metric: "power",
          value: 230 + i,
          unit: "W",
          effectiveFrom: addDays(today, -40),
          source: "manual",
        });
      if (i % 3 === 0)
        await Threshold.create({
          athleteId: a.id,
          sport: "bike",
          metric: "power",
          value: 260 + i,
          unit: "W",
          effectiveFrom: addDays(today, 5),
          source: "manual",
        });
      if (i % 4 === 1)
        await FieldTest.create({
          athleteId: a.id,
          protocol: "ftp20",
          sport: "bike",
          metric: "power",
          inputs: {},
          value: 250,
          unit: "W",
          testedOn: addDays(today, -10 - i),
          status: "active",
        } as never);
      const days = i === 7 ? 0 : 20 + i * 10;
      for (let d = 0; d < days; d++) {
        await ScheduledSession.create({
          athleteId: a.id,
          date: addDays(today, -d + (i % 3)),
          name: `S${d}`,
          sport: "bike",
          status: d % 4 === 0 ? "skipped" : d < 2 ? "planned" : "done",
          effortScore: 3 + (d % 6),
          actualMinutes: 40 + (d % 5) * 15,
          plannedDurationS: 3600,
          plannedLoad: 250 + d,
          testProtocol: d === 0 && i % 2 === 1 ? "ftp20" : null,
        } as never);
      }
    }
    const { result: roster, statements } = await countStatements(() => rosterFor(coach.id));
    expect(statements).toBeLessThanOrEqual(10);
    expect(roster.athletes.map((r) => r.name)).toEqual([...athletes.map((a) => a.name)].sort());
    for (const a of athletes) {
      const row = roster.athletes.find((r) => r.id === a.id)!;
      const today = todayIn(a.timezone);
      expect(row.today).toBe(today);
      expect(row.thresholds).toEqual(
        (await currentThresholds(a.id, today)).map((t) => ({
          sport: t.sport,
          metric: t.metric,
          value: t.value,
          unit: t.unit,
          since: t.effectiveFrom,
        })),
      );
      expect(row.retest).toEqual(await retestStatus(a.id, today));
      expect(row.load).toEqual(await rosterLoad(a));
    }
  });
});
