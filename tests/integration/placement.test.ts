import { Op } from "sequelize";
import { describe, expect, it } from "vitest";
import { CoachAthlete, ScheduledSession, Threshold } from "~/.server/models";
import { createPlan } from "~/.server/services/plans";
import * as assign from "~/routes/coach/assign";
import { fieldErrorsOf, formRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const START = "2027-05-03"; // a Monday

async function scenario() {
  const coach = await makeUser({ role: "coach", email: `coach.${Date.now()}.${Math.random()}@example.test` });
  const rider = await makeUser({ role: "athlete", name: "Rider R" });
  const runner = await makeUser({ role: "athlete", name: "Runner N" });
  for (const a of [rider, runner]) await CoachAthlete.create({ coachId: coach.id, athleteId: a.id });
  await Threshold.create({
    athleteId: rider.id,
    sport: "bike",
    metric: "power",
    value: 250,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  await Threshold.create({
    athleteId: runner.id,
    sport: "run",
    metric: "pace",
    value: 285,
    unit: "s/km",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  // Each new plan puts a 20-minute test in its first week, so two plans from one Monday put two tests on one day.
  const plan = (name: string) =>
    createPlan(coach.id, {
      name,
      sport: "bike",
      description: "",
      alignment: "start",
      date: START,
      weeks: 4,
      weeklyHours: 8,
      pattern: "3:1",
      testEveryWeeks: 6,
    });
  const cookie = await signIn(coach.email);
  const post = (planId: number, fields: Record<string, string | string[]>) =>
    run(
      assign.action,
      formRequest(`/coach/plans/${planId}/assign`, { mode: "start", date: START, ...fields }, { cookie }),
      { planId: String(planId) },
    );
  return { coach, rider, runner, plan, post };
}
const planned = (athleteId: number) => ScheduledSession.findAll({ where: { athleteId, status: "planned" } });

describe("assign checks sport and overlap before writing", () => {
  it("a bike plan for a runner is reported first, refused without confirmation, placed once confirmed", async () => {
    const { runner, plan, post } = await scenario();
    const p = await plan("Bike base");
    const first = payloadOf(await post(p.id, { athleteIds: String(runner.id) }));
    expect(first).toMatchObject({
      status: "error",
      error: { "": ["Nothing has been placed yet. Check what would happen and choose."] },
    });
    expect(first.reports).toHaveLength(1);
    expect(first.reports[0]).toMatchObject({ athlete: "Runner N", sportsWithoutThreshold: ["bike"], overlap: null });
    expect(await planned(runner.id)).toHaveLength(0);

    // Answered without ticking the sport confirmation: refused, nothing written.
    const refused = await post(p.id, { athleteIds: String(runner.id), decided: "1" });
    expect(statusOf(refused)).toBe(409);
    expect(fieldErrorsOf(refused).form).toMatch(/No threshold yet for bike/);
    expect(await planned(runner.id)).toHaveLength(0);

    const placed = payloadOf(await post(p.id, { athleteIds: String(runner.id), decided: "1", confirmSports: "on" }));
    expect(placed.status).toBe("success");
    expect((await planned(runner.id)).length).toBeGreaterThan(0);
  });

  it("a second plan over the first: replace from a date cancels the planned sessions there and leaves one test a day", async () => {
    const { rider, plan, post } = await scenario();
    const a = await plan("Spring A");
    const b = await plan("Spring B");
    expect(payloadOf(await post(a.id, { athleteIds: String(rider.id) })).status).toBe("success");
    const fromA = await planned(rider.id);
    expect(fromA.length).toBeGreaterThan(0);

    const report = payloadOf(await post(b.id, { athleteIds: String(rider.id) }));
    expect(report.status).toBe("error");
    const r = report.reports[0];
    expect(r.overlap).toMatchObject({ sessions: fromA.length, plans: ["Spring A"] });
    expect(r.testDays.length).toBeGreaterThan(0);
    expect(r.testDays[0].names).toHaveLength(2);
    expect(await planned(rider.id)).toHaveLength(fromA.length);

    // Alongside without confirming the two maximal tests: refused, nothing written.
    const refused = await post(b.id, { athleteIds: String(rider.id), decided: "1", overlap: "alongside" });
    expect(statusOf(refused)).toBe(409);
    expect(fieldErrorsOf(refused).form).toMatch(/Two maximal tests/);
    expect(await planned(rider.id)).toHaveLength(fromA.length);
    // Replace without a date is a form error.
    const noDate = await post(b.id, {
      athleteIds: String(rider.id),
      decided: "1",
      overlap: "replace",
      replaceFrom: "",
    });
    expect(statusOf(noDate)).toBe(400);
    expect(fieldErrorsOf(noDate)).toEqual({ form: "Check the form.", replaceFrom: "Choose the date to replace from." });
    expect(await planned(rider.id)).toHaveLength(fromA.length);

    // Replace from the second week: week 1 of plan A stays, the rest gives way; the test clash in week 1 still needs a yes.
    const week2 = "2027-05-10";
    expect(
      statusOf(
        await post(b.id, { athleteIds: String(rider.id), decided: "1", overlap: "replace", replaceFrom: week2 }),
      ),
    ).toBe(409);
    // From the start: no clash is left, so no confirmation is needed.
    const done = payloadOf(
      await post(b.id, { athleteIds: String(rider.id), decided: "1", overlap: "replace", replaceFrom: START }),
    );
    expect(done.status).toBe("success");
    expect(done.message).toMatch(/replaced/);
    const cancelled = await ScheduledSession.count({ where: { athleteId: rider.id, status: "cancelled" } });
    expect(cancelled).toBe(fromA.length);
    const tests = await ScheduledSession.findAll({
      where: { athleteId: rider.id, status: "planned", testProtocol: { [Op.ne]: null } },
    });
    expect(new Set(tests.map((t) => t.date)).size).toBe(tests.length);
  });

  it("alongside with the tests confirmed keeps both plans", async () => {
    const { rider, plan, post } = await scenario();
    const a = await plan("Summer A");
    const b = await plan("Summer B");
    await post(a.id, { athleteIds: String(rider.id) });
    const before = (await planned(rider.id)).length;
    const ok = payloadOf(
      await post(b.id, { athleteIds: String(rider.id), decided: "1", overlap: "alongside", confirmTests: "on" }),
    );
    expect(ok.status).toBe("success");
    expect((await planned(rider.id)).length).toBe(before * 2);
  });

  it("another coach's athlete cannot be assigned, checks or not", async () => {
    const { plan, post } = await scenario();
    const other = await scenario();
    const p = await plan("Mine");
    const res = await post(p.id, { athleteIds: String(other.rider.id) });
    expect(statusOf(res)).toBe(404);
    expect(await planned(other.rider.id)).toHaveLength(0);
  });
});
