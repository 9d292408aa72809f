import { describe, expect, it } from "vitest";
import {
  CoachAthlete,
  PlanItem,
  PlanWeek,
  ScheduledBlock,
  ScheduledSession,
  SeasonPlan,
  ShelfSession,
  ShelfBlock,
  Threshold,
} from "~/.server/models";
import { createPlan } from "~/.server/services/plans";
import * as items from "~/routes/api/plan-items";
import * as boardPage from "~/routes/coach/board";
import * as boardShelf from "~/routes/coach/board-shelf";
import * as boardItem from "~/routes/coach/board-item";
import { boardItems } from "~/lib/board";
import { estimateSession, expandBlocks, type Block } from "~/lib/training";
import * as assign from "~/routes/coach/assign";
import * as calendarApi from "~/routes/api/calendar";
import * as athleteSession from "~/routes/athlete/session";
import { addDays, mondayOf, todayIn } from "~/lib/dates";
import { fieldErrorsOf, formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const BASE = "http://localhost:3999";

async function setup() {
  const coach = await makeUser({ role: "coach" });
  const cookie = await signIn(coach.email);
  const plan = await createPlan(coach.id, {
    name: "Board test",
    sport: "bike",
    description: "",
    alignment: "start",
    date: "2027-01-04",
    weeks: 4,
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  // No automatic test items for these tests: start from an empty board.
  await PlanItem.destroy({ where: { planId: plan.id } });
  const weeks = await PlanWeek.findAll({ where: { planId: plan.id }, order: [["idx", "ASC"]] });
  const mk = async (name: string, blocks: unknown[]) => {
    const s = await ShelfSession.create({ ownerId: coach.id, name, sport: "bike" });
    await ShelfBlock.bulkCreate(
      blocks.map((spec, position) => ({ sessionId: s.id, position, kind: (spec as { kind: string }).kind, spec })),
    );
    return s;
  };
  const threshold = await mk("Threshold 4 × 8", [
    { kind: "warmup", durationS: 600, target: { metric: "power", lowPct: 50, highPct: 65 } },
    {
      kind: "repeats",
      count: 4,
      work: { durationS: 480, target: { metric: "power", lowPct: 95, highPct: 99 } },
      recovery: { durationS: 240, target: { metric: "power", lowPct: 50 } },
    },
  ]);
  const hr = await mk("HR steady", [
    { kind: "steady", durationS: 3000, target: { metric: "heart_rate", lowPct: 81, highPct: 88 } },
  ]);
  return { coach, cookie, plan, weeks, threshold, hr };
}

function post(planId: number, body: unknown, cookie: string) {
  return new Request(`${BASE}/api/plans/${planId}/items`, {
    method: "POST",
    body: JSON.stringify(body),
    headers: { "Content-Type": "application/json", Cookie: cookie },
  });
}
async function op(planId: number, body: unknown, cookie: string) {
  const res = (await run(items.action, post(planId, body, cookie), { planId: String(planId) })) as Response;
  return { status: res.status, body: await res.json() };
}
const slot = (list: { weekId: number; day: number; position: number; name: string }[], weekId: number, day: number) =>
  list.filter((i) => i.weekId === weekId && i.day === day).sort((a, b) => a.position - b.position);

describe("plan board changes", () => {
  it("copies from the shelf, reorders within a day, moves between weeks and removes, keeping orders contiguous", async () => {
    const { cookie, plan, weeks, threshold, hr } = await setup();
    const w1 = weeks[0].id;
    const w2 = weeks[1].id;
    let r = await op(plan.id, { op: "copy", sessionId: threshold.id, toWeek: w2, toDay: 1, toIndex: 0 }, cookie);
    expect(r.status).toBe(200);
    r = await op(
      plan.id,
      { op: "copy", sessionId: hr.id, toWeek: w2, toDay: 1, toIndex: 0, version: r.body.version },
      cookie,
    );
    expect(slot(r.body.items, w2, 1).map((i) => i.name)).toEqual(["HR steady", "Threshold 4 × 8"]);
    // The copy is a snapshot: editing the shelf session later does not change the plan.
    await ShelfBlock.update({ spec: { kind: "open", durationS: 60 } }, { where: { sessionId: hr.id } });
    const hrItem = r.body.items.find((i: { name: string }) => i.name === "HR steady");
    expect(hrItem.blocks[0].kind).toBe("steady");

    r = await op(
      plan.id,
      { op: "move", itemId: hrItem.id, toWeek: w2, toDay: 1, toIndex: 1, version: r.body.version },
      cookie,
    );
    expect(slot(r.body.items, w2, 1).map((i) => [i.name, i.position])).toEqual([
      ["Threshold 4 × 8", 0],
      ["HR steady", 1],
    ]);
    r = await op(
      plan.id,
      { op: "move", itemId: hrItem.id, toWeek: w1, toDay: 5, toIndex: 0, version: r.body.version },
      cookie,
    );
    expect(slot(r.body.items, w1, 5).map((i) => i.name)).toEqual(["HR steady"]);
    expect(slot(r.body.items, w2, 1).map((i) => [i.name, i.position])).toEqual([["Threshold 4 × 8", 0]]);
    r = await op(plan.id, { op: "duplicate-week", fromWeek: w2, toWeek: w1, version: r.body.version }, cookie);
    expect(r.body.items).toHaveLength(3);
    r = await op(plan.id, { op: "remove", itemId: hrItem.id, version: r.body.version }, cookie);
    expect(r.body.items.map((i: { name: string }) => i.name).sort()).toEqual(["Threshold 4 × 8", "Threshold 4 × 8"]);
    expect((await SeasonPlan.findByPk(plan.id))!.version).toBe(r.body.version);
  });

  it("answers a move made on a stale board with 409 and changes nothing", async () => {
    const { cookie, plan, weeks, threshold } = await setup();
    const first = await op(
      plan.id,
      { op: "copy", sessionId: threshold.id, toWeek: weeks[0].id, toDay: 0, toIndex: 0 },
      cookie,
    );
    const stale = first.body.version - 1;
    const r = await op(
      plan.id,
      { op: "move", itemId: first.body.items[0].id, toWeek: weeks[1].id, toDay: 3, toIndex: 0, version: stale },
      cookie,
    );
    expect(r.status).toBe(409);
    expect(r.body.version).toBe(first.body.version);
    expect((await PlanItem.findByPk(first.body.items[0].id))!.weekId).toBe(weeks[0].id);
  });

  it("20 concurrent moves leave every item present once with contiguous orders", async () => {
    const { cookie, plan, weeks, threshold } = await setup();
    for (let i = 0; i < 10; i++)
      await op(plan.id, { op: "copy", sessionId: threshold.id, toWeek: weeks[0].id, toDay: 0, toIndex: i }, cookie);
    const ids = (await PlanItem.findAll({ where: { planId: plan.id } })).map((i) => i.id);
    const moves = Array.from({ length: 20 }, (_, k) =>
      op(
        plan.id,
        { op: "move", itemId: ids[k % ids.length], toWeek: weeks[k % 3].id, toDay: k % 7, toIndex: k % 4 },
        cookie,
      ),
    );
    const results = await Promise.all(moves);
    expect(results.every((r) => r.status === 200)).toBe(true);
    const after = await PlanItem.findAll({ where: { planId: plan.id } });
    expect(after.map((i) => i.id).sort()).toEqual([...ids].sort());
    const slots = new Map<string, number[]>();
    for (const i of after)
      slots.set(`${i.weekId}:${i.day}`, [...(slots.get(`${i.weekId}:${i.day}`) ?? []), i.position]);
    for (const positions of slots.values()) expect(positions.sort((a, b) => a - b)).toEqual(positions.map((_, k) => k));
  });

  it("refuses bad changes clearly, and another coach's plan answers 404", async () => {
    const { cookie, plan, weeks, threshold } = await setup();
    expect((await op(plan.id, { op: "teleport" }, cookie)).status).toBe(400);
    expect(
      (await op(plan.id, { op: "copy", sessionId: threshold.id, toWeek: weeks[0].id, toDay: 9, toIndex: 0 }, cookie))
        .status,
    ).toBe(400);
    const bad = (await run(
      items.action,
      new Request(`${BASE}/api/plans/${plan.id}/items`, {
        method: "POST",
        body: "{",
        headers: { "Content-Type": "application/json", Cookie: cookie },
      }),
      { planId: String(plan.id) },
    )) as Response;
    expect(bad.status).toBe(400);
    const other = await makeUser({ role: "coach" });
    const otherCookie = await signIn(other.email);
    expect(
      (
        await op(
          plan.id,
          { op: "copy", sessionId: threshold.id, toWeek: weeks[0].id, toDay: 0, toIndex: 0 },
          otherCookie,
        )
      ).status,
    ).toBe(404);
    const mine = await op(
      plan.id,
      { op: "copy", sessionId: threshold.id, toWeek: weeks[0].id, toDay: 0, toIndex: 0 },
      cookie,
    );
    expect((await op(plan.id, { op: "remove", itemId: mine.body.items[0].id }, otherCookie)).status).toBe(404);
    expect(await PlanItem.count({ where: { planId: plan.id } })).toBe(1);
  });
});

describe("the board's own data routes", () => {
  it("the loader brings the shelf, the shelf route searches it, the card route gives blocks; strangers get 404", async () => {
    const { cookie, plan, weeks, threshold } = await setup();
    const params = { planId: String(plan.id) };
    const page = payloadOf(await run(boardPage.loader, getRequest(`/coach/plans/${plan.id}/board`, cookie), params));
    expect(page.shelf.map((s: { name: string }) => s.name).sort()).toEqual(["HR steady", "Threshold 4 × 8"]);
    const search = (q: string, c = cookie) =>
      run(boardShelf.loader, getRequest(`/coach/plans/${plan.id}/board/shelf?q=${encodeURIComponent(q)}`, c), params);
    const found = payloadOf(await search("thresh"));
    expect(found.sessions.map((s: { name: string }) => s.name)).toEqual(["Threshold 4 × 8"]);
    expect(found.sessions[0].profile.length).toBeGreaterThan(0);
    expect(payloadOf(await search("nothing like it")).sessions).toEqual([]);

    const copied = await op(
      plan.id,
      { op: "copy", sessionId: threshold.id, toWeek: weeks[0].id, toDay: 1, toIndex: 0 },
      cookie,
    );
    const itemId = copied.body.items[0].id as number;
    const card = (id: number, c = cookie) =>
      run(boardItem.loader, getRequest(`/coach/plans/${plan.id}/board/items/${id}`, c), {
        ...params,
        itemId: String(id),
      });
    const opened = await card(itemId);
    expect(statusOf(opened)).toBe(200);
    expect(payloadOf(opened).item.blocks.map((b: { kind: string }) => b.kind)).toEqual(["warmup", "repeats"]);
    // A card removed elsewhere is an answer the drawer can show, not a thrown error page.
    await op(plan.id, { op: "remove", itemId }, cookie);
    const gone = await card(itemId);
    expect(statusOf(gone)).toBe(404);
    expect(payloadOf(gone)).toEqual({ item: null, error: "That session is no longer on this plan." });

    const other = await signIn((await makeUser({ role: "coach" })).email);
    const refused = async (p: Promise<unknown>) => statusOf(await p.catch((e: unknown) => e));
    expect(await refused(search("", other))).toBe(404);
    expect(await refused(card(itemId, other))).toBe(404);
  });
});

describe("assignment and materialization", () => {
  it("resolves absolute targets from each athlete's thresholds, and leaves an athlete without one in 'needs a field test'", async () => {
    const { coach, cookie, plan, weeks, threshold, hr } = await setup();
    await op(plan.id, { op: "copy", sessionId: threshold.id, toWeek: weeks[1].id, toDay: 1, toIndex: 0 }, cookie);
    await op(plan.id, { op: "copy", sessionId: hr.id, toWeek: weeks[1].id, toDay: 3, toIndex: 0 }, cookie);
    const withT = await makeUser({ role: "athlete", timezone: "Europe/Madrid" });
    const without = await makeUser({ role: "athlete" });
    await CoachAthlete.bulkCreate([
      { coachId: coach.id, athleteId: withT.id },
      { coachId: coach.id, athleteId: without.id },
    ]);
    await Threshold.create({
      athleteId: withT.id,
      sport: "bike",
      metric: "power",
      value: 250,
      unit: "W",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });
    await Threshold.create({
      athleteId: withT.id,
      sport: "bike",
      metric: "heart_rate",
      value: 170,
      unit: "bpm",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });

    const res = await run(
      assign.action,
      formRequest(
        `/coach/plans/${plan.id}/assign`,
        {
          athleteIds: [String(withT.id), String(without.id)],
          mode: "start",
          date: "2027-01-06",
          decided: "1",
          confirmSports: "on",
        },
        { cookie },
      ),
      { planId: String(plan.id) },
    );
    expect(payloadOf(res).status).toBe("success");
    // The Monday on or after 6 January 2027 is 11 January; week 2's Tuesday is 19 January.
    const s = await ScheduledSession.findOne({ where: { athleteId: withT.id, name: "Threshold 4 × 8" } });
    expect(s!.date).toBe("2027-01-19");
    const blocks = await ScheduledBlock.findAll({ where: { scheduledSessionId: s!.id }, order: [["position", "ASC"]] });
    expect(blocks).toHaveLength(1 + 8);
    // 95–99 % of 250 W → 237.5 → 238 (round half up), 247.5 → 248.
    expect(blocks[1]).toMatchObject({ part: "work", lowAbs: 238, highAbs: 248, unit: "W", thresholdValue: 250 });
    expect(blocks[2]).toMatchObject({ part: "recovery", lowAbs: 125, highAbs: 125 });
    const hrSession = await ScheduledSession.findOne({ where: { athleteId: withT.id, name: "HR steady" } });
    const hrBlock = await ScheduledBlock.findOne({ where: { scheduledSessionId: hrSession!.id } });
    expect(hrBlock).toMatchObject({ lowAbs: Math.round(0.81 * 170), highAbs: Math.round(0.88 * 170), unit: "bpm" });

    const none = await ScheduledBlock.findAll({ where: { athleteId: without.id } });
    expect(none.length).toBeGreaterThan(0);
    expect(none.every((b) => b.lowAbs === null && b.thresholdId === null)).toBe(true);
    const cookieA = await signIn(without.email);
    const cal = (await run(
      calendarApi.loader,
      getRequest("/api/calendar?from=2027-01-11&to=2027-01-24", cookieA),
    )) as Response;
    const body = await cal.json();
    expect(body.sessions.find((x: { name: string }) => x.name === "Threshold 4 × 8")).toMatchObject({
      needsTest: true,
      keyTarget: "4 × 8 min at 95–99 % power, 4 min at 50 % power between",
    });
    const cookieT = await signIn(withT.email);
    const calT = await (
      (await run(calendarApi.loader, getRequest("/api/calendar?from=2027-01-11&to=2027-01-24", cookieT))) as Response
    ).json();
    expect(calT.sessions.find((x: { name: string }) => x.name === "Threshold 4 × 8").keyTarget).toBe(
      "4 × 8 min at 238–248 W, 4 min at 125 W between",
    );
  });

  it("resolves pace as the inverse: 110 % of 4:00/km is 3:38/km", async () => {
    const { coach, cookie, plan, weeks } = await setup();
    const run5 = await ShelfSession.create({ ownerId: coach.id, name: "Run fast", sport: "run" });
    await ShelfBlock.create({
      sessionId: run5.id,
      position: 0,
      kind: "steady",
      spec: { kind: "steady", durationS: 600, target: { metric: "pace", lowPct: 95, highPct: 110 } },
    });
    await op(plan.id, { op: "copy", sessionId: run5.id, toWeek: weeks[0].id, toDay: 2, toIndex: 0 }, cookie);
    const runner = await makeUser({ role: "athlete" });
    await CoachAthlete.create({ coachId: coach.id, athleteId: runner.id });
    await Threshold.create({
      athleteId: runner.id,
      sport: "run",
      metric: "pace",
      value: 240,
      unit: "s/km",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });
    await run(
      assign.action,
      formRequest(
        `/coach/plans/${plan.id}/assign`,
        { athleteIds: String(runner.id), mode: "event", date: "2027-03-07", decided: "1", confirmSports: "on" },
        { cookie },
      ),
      { planId: String(plan.id) },
    );
    const b = await ScheduledBlock.findOne({ where: { athleteId: runner.id } });
    expect(b).toMatchObject({ lowAbs: Math.round(240 / 0.95), highAbs: Math.round(240 / 1.1), unit: "s/km" });
    expect(b!.highAbs).toBe(218);
    // Ending in the week of Sunday 7 March: four weeks from Monday 8 February; week 1 Wednesday is 10 February.
    expect((await ScheduledSession.findOne({ where: { athleteId: runner.id } }))!.date).toBe("2027-02-10");
  });

  it("a coach cannot assign to another coach's athlete (404) and nothing is placed", async () => {
    const { cookie, plan } = await setup();
    const stranger = await makeUser({ role: "athlete" });
    const res = await run(
      assign.action,
      formRequest(
        `/coach/plans/${plan.id}/assign`,
        { athleteIds: String(stranger.id), mode: "start", date: "2027-01-04" },
        { cookie },
      ),
      { planId: String(plan.id) },
    );
    expect(statusOf(res)).toBe(404);
    expect(await ScheduledSession.count({ where: { athleteId: stranger.id } })).toBe(0);
    const none = await run(
      assign.action,
      formRequest(`/coach/plans/${plan.id}/assign`, { mode: "start", date: "2027-01-04" }, { cookie }),
      { planId: String(plan.id) },
    );
    expect(statusOf(none)).toBe(400);
    expect(fieldErrorsOf(none).athleteIds).toMatch(/at least one/);
    expect(await ScheduledSession.count({ where: { athleteId: stranger.id } })).toBe(0);
  });

  it("pushes plan changes to future sessions only, keeping each session's row (same calendar UID) with a higher sequence", async () => {
    const { coach, cookie, plan, weeks, threshold, hr } = await setup();
    const athlete = await makeUser({ role: "athlete" });
    await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
    const today = todayIn("UTC");
    const start = addDays(mondayOf(today), -7); // week 1 is last week, week 2 this week
    const placed = await op(
      plan.id,
      { op: "copy", sessionId: threshold.id, toWeek: weeks[0].id, toDay: 0, toIndex: 0 },
      cookie,
    );
    await op(plan.id, { op: "copy", sessionId: threshold.id, toWeek: weeks[2].id, toDay: 2, toIndex: 0 }, cookie);
    await run(
      assign.action,
      formRequest(
        `/coach/plans/${plan.id}/assign`,
        { athleteIds: String(athlete.id), mode: "start", date: start, decided: "1", confirmSports: "on" },
        { cookie },
      ),
      { planId: String(plan.id) },
    );
    const before = await ScheduledSession.findAll({ where: { athleteId: athlete.id }, order: [["date", "ASC"]] });
    expect(before).toHaveLength(2);
    // Change the plan: swap the future session and add one; also change the past one.
    const future = (await PlanItem.findOne({ where: { planId: plan.id, weekId: weeks[2].id } }))!;
    let v = (await SeasonPlan.findByPk(plan.id))!.version;
    await op(plan.id, { op: "move", itemId: future.id, toWeek: weeks[2].id, toDay: 4, toIndex: 0, version: v }, cookie);
    await op(plan.id, { op: "copy", sessionId: hr.id, toWeek: weeks[3].id, toDay: 1, toIndex: 0 }, cookie);
    await op(plan.id, { op: "remove", itemId: placed.body.items[0].id }, cookie);
    // Nothing changes on the calendar until the coach pushes.
    expect(await ScheduledSession.count({ where: { athleteId: athlete.id } })).toBe(2);
    const pushed = await run(
      assign.action,
      formRequest(`/coach/plans/${plan.id}/assign`, { intent: "push" }, { cookie }),
      { planId: String(plan.id) },
    );
    expect(payloadOf(pushed).status).toBe("success");
    const after = await ScheduledSession.findAll({ where: { athleteId: athlete.id }, order: [["date", "ASC"]] });
    expect(after).toHaveLength(3);
    const past = after.find((s) => s.id === before[0].id)!;
    expect(past).toMatchObject({ date: before[0].date, status: "planned", feedSequence: 0 }); // past: untouched
    const moved = after.find((s) => s.id === before[1].id)!;
    expect(moved.date).toBe(addDays(start, 14 + 4));
    expect(moved.feedSequence).toBe(1);
    expect(after.some((s) => s.name === "HR steady")).toBe(true);
    v = (await SeasonPlan.findByPk(plan.id))!.version;
    expect(v).toBeGreaterThan(0);
  });
});

describe("athlete calendar", () => {
  it("moves a planned session through the JSON route, re-resolving targets; done sessions stay put; strangers get 404", async () => {
    const { coach, cookie, plan, weeks, threshold } = await setup();
    await op(plan.id, { op: "copy", sessionId: threshold.id, toWeek: weeks[0].id, toDay: 0, toIndex: 0 }, cookie);
    const athlete = await makeUser({ role: "athlete" });
    await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
    await Threshold.create({
      athleteId: athlete.id,
      sport: "bike",
      metric: "power",
      value: 200,
      unit: "W",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });
    await Threshold.create({
      athleteId: athlete.id,
      sport: "bike",
      metric: "power",
      value: 300,
      unit: "W",
      effectiveFrom: "2027-01-06",
      source: "manual",
    });
    await run(
      assign.action,
      formRequest(
        `/coach/plans/${plan.id}/assign`,
        { athleteIds: String(athlete.id), mode: "start", date: "2027-01-04", decided: "1", confirmSports: "on" },
        { cookie },
      ),
      { planId: String(plan.id) },
    );
    const s = (await ScheduledSession.findOne({ where: { athleteId: athlete.id } }))!;
    expect(s.date).toBe("2027-01-04");
    const work = async () => (await ScheduledBlock.findOne({ where: { scheduledSessionId: s.id, part: "work" } }))!;
    expect((await work()).lowAbs).toBe(190);
    const aCookie = await signIn(athlete.email);
    const move = (body: unknown, c = aCookie, q = "") =>
      run(
        calendarApi.action,
        new Request(`${BASE}/api/calendar${q}`, {
          method: "POST",
          body: JSON.stringify(body),
          headers: { "Content-Type": "application/json", Cookie: c },
        }),
      );
    const moved = (await move({ sessionId: s.id, date: "2027-01-07" })) as Response;
    expect(moved.status).toBe(200);
    await s.reload();
    expect(s).toMatchObject({ date: "2027-01-07", feedSequence: 1 });
    expect((await work()).lowAbs).toBe(285); // the threshold in force on the new date
    expect(((await move({ sessionId: s.id, date: "2027-13-40" })) as Response).status).toBe(400);

    const done = await run(
      athleteSession.action,
      formRequest(
        `/athlete/sessions/${s.id}`,
        { status: "done", effortScore: "7", minutes: "60", comment: "Solid" },
        { cookie: aCookie },
      ),
      { id: String(s.id) },
    );
    expect(payloadOf(done)).toMatchObject({ status: "success", message: "Marked done. Nice work." });
    expect(((await move({ sessionId: s.id, date: "2027-01-08" })) as Response).status).toBe(400);
    const noScore = await run(
      athleteSession.action,
      formRequest(`/athlete/sessions/${s.id}`, { status: "done", minutes: "60" }, { cookie: aCookie }),
      { id: String(s.id) },
    );
    expect(statusOf(noScore)).toBe(400);
    expect(fieldErrorsOf(noScore)).toEqual({ form: "Check the form.", effortScore: "Choose how hard it felt (0–10)." });
    // Refused input changes nothing: the session keeps what the good submission recorded.
    expect(await ScheduledSession.findByPk(s.id)).toMatchObject({ status: "done", effortScore: 7, comment: "Solid" });

    const stranger = await makeUser({ role: "athlete" });
    const sCookie = await signIn(stranger.email);
    expect(((await move({ sessionId: s.id, date: "2027-01-09" }, sCookie)) as Response).status).toBe(404);
    expect(
      statusOf(
        await run(athleteSession.loader, getRequest(`/athlete/sessions/${s.id}`, sCookie), { id: String(s.id) }),
      ),
    ).toBe(404);
    const cal = await (
      (await run(calendarApi.loader, getRequest("/api/calendar?from=2027-01-04&to=2027-01-10", sCookie))) as Response
    ).json();
    expect(cal.sessions).toEqual([]);
    const otherCoach = await makeUser({ role: "coach" });
    const ocCookie = await signIn(otherCoach.email);
    expect(
      statusOf(
        await run(
          calendarApi.loader,
          getRequest(`/api/calendar?from=2027-01-04&to=2027-01-10&athleteId=${athlete.id}`, ocCookie),
        ),
      ),
    ).toBe(404);
    const mine = (await run(
      calendarApi.loader,
      getRequest(`/api/calendar?from=2027-01-04&to=2027-01-10&athleteId=${athlete.id}`, cookie),
    )) as Response;
    expect((await mine.json()).sessions).toHaveLength(1);
  });

  it("sends the board page compact cards with one shape per distinct session, and the blocks only when a card opens", async () => {
    const { coach, cookie, plan, weeks, threshold, hr } = await setup();
    let r = await op(
      plan.id,
      { op: "copy", sessionId: threshold.id, toWeek: weeks[0].id, toDay: 1, toIndex: 0 },
      cookie,
    );
    r = await op(
      plan.id,
      { op: "copy", sessionId: threshold.id, toWeek: weeks[1].id, toDay: 1, toIndex: 0, version: r.body.version },
      cookie,
    );
    r = await op(
      plan.id,
      { op: "copy", sessionId: hr.id, toWeek: weeks[1].id, toDay: 3, toIndex: 0, version: r.body.version },
      cookie,
    );
    r = await op(
      plan.id,
      {
        op: "note",
        itemId: r.body.items.find((i: { name: string }) => i.name === "HR steady").id,
        notes: "Nose breathing only.",
        version: r.body.version,
      },
      cookie,
    );
    const full = r.body.items as {
      id: number;
      name: string;
      blocks: Block[];
      durationS: number;
      weekId: number;
      day: number;
      position: number;
    }[];

    const page = payloadOf(
      await run(boardPage.loader, getRequest(`/coach/plans/${plan.id}/board`, cookie), { planId: String(plan.id) }),
    );
    expect(page.cards).toHaveLength(3);
    expect(page.shapes).toHaveLength(2);
    expect(JSON.stringify(page)).not.toContain('"blocks"');
    const cards = boardItems(page.cards, page.shapes);
    for (const item of full) {
      const card = cards.find((c) => c.id === item.id)!;
      expect([card.weekId, card.day, card.position, card.name, card.durationS]).toEqual([
        item.weekId,
        item.day,
        item.position,
        item.name,
        item.durationS,
      ]);
      // The shape is the engine's own reading of the item's blocks (default power bands: the coach has none of their own).
      const shape = page.shapes[card.shape];
      expect(shape.steps.map((s: { d: number }) => s.d)).toEqual(expandBlocks(item.blocks).map((s) => s.durationS));
      expect(shape.load).toBeCloseTo(estimateSession(item.blocks).plannedEffortLoad, 9);
      expect(shape.levels).toEqual(estimateSession(item.blocks).minutesPerBand);
    }
    expect(cards.find((c) => c.name === "HR steady")!.notes).toBe("Nose breathing only.");
    expect(cards.filter((c) => c.name === "Threshold 4 × 8").map((c) => c.shape)).toEqual([0, 0]);

    const one = full.find((i) => i.name === "HR steady")!;
    const detail = (await run(items.loader, getRequest(`/api/plans/${plan.id}/items?item=${one.id}`, cookie), {
      planId: String(plan.id),
    })) as Response;
    expect(detail.status).toBe(200);
    expect((await detail.json()).item.blocks).toEqual(one.blocks);

    // Another coach's plan or item, or an item of another plan: 404, whoever asks.
    const other = await makeUser({ role: "coach" });
    const otherCookie = await signIn(other.email);
    expect(
      statusOf(
        await run(items.loader, getRequest(`/api/plans/${plan.id}/items?item=${one.id}`, otherCookie), {
          planId: String(plan.id),
        }),
      ),
    ).toBe(404);
    const second = await createPlan(coach.id, {
      name: "Second",
      sport: "bike",
      description: "",
      alignment: "start",
      date: "2027-01-04",
      weeks: 4,
      weeklyHours: 8,
      pattern: "3:1",
      testEveryWeeks: 6,
    });
    expect(
      statusOf(
        await run(items.loader, getRequest(`/api/plans/${second.id}/items?item=${one.id}`, cookie), {
          planId: String(second.id),
        }),
      ),
    ).toBe(404);
    expect(
      statusOf(
        await run(items.loader, getRequest(`/api/plans/${plan.id}/items?item=abc`, cookie), {
          planId: String(plan.id),
        }),
      ),
    ).toBe(404);
    expect(
      statusOf(
        await run(boardPage.loader, getRequest(`/coach/plans/${plan.id}/board`, otherCookie), {
          planId: String(plan.id),
        }),
      ),
    ).toBe(404);
  });
});
