import { describe, expect, it } from "vitest";
import { PlanWeek, SeasonPlan } from "~/.server/models";
import { createPlan } from "~/.server/services/plans";
import * as planPage from "~/routes/coach/plan";
import { fieldErrorsOf, formRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

async function scenario() {
  const coach = await makeUser({ role: "coach" });
  const plan = await createPlan(coach.id, {
    name: "Weeks",
    sport: "bike",
    description: "",
    alignment: "start",
    date: "2027-02-01",
    weeks: 6,
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  const weeks = await PlanWeek.findAll({ where: { planId: plan.id }, order: [["idx", "ASC"]] });
  const cookie = await signIn(coach.email);
  const post = (fields: Record<string, string | string[]>, c = cookie) =>
    run(planPage.action, formRequest(`/coach/plans/${plan.id}`, fields, { cookie: c }), { planId: String(plan.id) });
  /** The whole table as the page sends it, with overrides per week id. */
  const table = (over: Record<string, string> = {}) => {
    const f: Record<string, string | string[]> = { intent: "weeks", weekId: weeks.map((w) => String(w.id)) };
    for (const w of weeks) {
      f[`phase-${w.id}`] = w.phase;
      if (w.recovery) f[`recovery-${w.id}`] = "on";
      if (w.test) f[`test-${w.id}`] = "on";
      f[`plannedHours-${w.id}`] = String(w.plannedHours);
      f[`loadFactor-${w.id}`] = String(w.loadFactor);
      f[`notes-${w.id}`] = w.notes;
    }
    return { ...f, ...over };
  };
  return { plan, weeks, post, table };
}
const snapshot = async (planId: number) =>
  (await PlanWeek.findAll({ where: { planId }, order: [["idx", "ASC"]] })).map((w) => [
    w.phase,
    w.plannedHours,
    w.loadFactor,
    w.notes,
  ]);

describe("editing weeks in one form", () => {
  it("saves every changed week with one request, and nothing at all while any field is wrong", async () => {
    const { plan, weeks, post, table } = await scenario();
    const before = await snapshot(plan.id);
    const version = (await SeasonPlan.findByPk(plan.id))!.version;
    const [w1, w2, w3] = weeks;
    const bad = await post(
      table({ [`plannedHours-${w1.id}`]: "9", [`plannedHours-${w3.id}`]: "-2", [`loadFactor-${w2.id}`]: "7" }),
    );
    expect(statusOf(bad)).toBe(400);
    expect(fieldErrorsOf(bad)).toEqual({
      form: "Nothing was saved: fix the marked fields.",
      [`plannedHours-${w3.id}`]: "Hours cannot be negative.",
      [`loadFactor-${w2.id}`]: "Use a load factor from 0.3 to 2.",
    });
    expect(await snapshot(plan.id)).toEqual(before);

    const ok = payloadOf(
      await post(table({ [`plannedHours-${w1.id}`]: "9", [`phase-${w2.id}`]: "build", [`notes-${w3.id}`]: "Camp" })),
    );
    expect(ok).toMatchObject({ status: "success", message: "Saved 3 changed weeks." });
    const after = await snapshot(plan.id);
    expect(after[0][1]).toBe(9);
    expect(after[1][0]).toBe("build");
    expect(after[2][3]).toBe("Camp");
    expect(after.slice(3)).toEqual(before.slice(3));
    expect((await SeasonPlan.findByPk(plan.id))!.version).toBe(version + 1);
  });

  it("changes phase, hours and load factor for a run of weeks; empty fields keep their values", async () => {
    const { plan, post } = await scenario();
    const before = await snapshot(plan.id);
    const res = payloadOf(
      await post({ intent: "range", fromWeek: "2", toWeek: "3", phase: "", plannedHours: "6.5", loadFactor: "0.9" }),
    );
    expect(res).toMatchObject({ status: "success", message: "Changed weeks 2–3 (2 weeks)." });
    const after = await snapshot(plan.id);
    expect(after[1]).toEqual([before[1][0], 6.5, 0.9, before[1][3]]);
    expect(after[2]).toEqual([before[2][0], 6.5, 0.9, before[2][3]]);
    expect(after[0]).toEqual(before[0]);
    expect(statusOf(await post({ intent: "range", fromWeek: "2", toWeek: "9", plannedHours: "5" }))).toBe(400);
    expect(statusOf(await post({ intent: "range", fromWeek: "2", toWeek: "3" }))).toBe(400);
    const backwards = await post({ intent: "range", fromWeek: "3", toWeek: "2", plannedHours: "5" });
    expect(statusOf(backwards)).toBe(400);
    expect(fieldErrorsOf(backwards)).toEqual({
      form: "Check the change.",
      toWeek: "The last week must not be before the first.",
    });
    expect(await snapshot(plan.id)).toEqual(after);
  });

  it("renames the plan, and refuses an empty name beside the field without saving", async () => {
    const { plan, post } = await scenario();
    const empty = await post({ intent: "rename", name: "  ", description: "x" });
    expect(statusOf(empty)).toBe(400);
    expect(fieldErrorsOf(empty)).toEqual({ form: "Check the name.", name: "Give the plan a name." });
    expect((await SeasonPlan.findByPk(plan.id))!.name).toBe("Weeks");
    const ok = payloadOf(await post({ intent: "rename", name: "Spring block", description: "Base first" }));
    expect(ok).toMatchObject({ status: "success", message: "Plan renamed." });
    expect(await SeasonPlan.findByPk(plan.id)).toMatchObject({ name: "Spring block", description: "Base first" });
  });

  it("another coach's plan answers 404 and keeps its weeks", async () => {
    const { plan, table } = await scenario();
    const other = await makeUser({ role: "coach" });
    const before = await snapshot(plan.id);
    const res = await run(
      planPage.action,
      formRequest(`/coach/plans/${plan.id}`, table({}) as Record<string, string | string[]>, {
        cookie: await signIn(other.email),
      }),
      { planId: String(plan.id) },
    );
    expect(statusOf(res)).toBe(404);
    expect(await snapshot(plan.id)).toEqual(before);
  });
});
