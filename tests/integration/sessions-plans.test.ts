import fs from "node:fs";
import { describe, expect, it } from "vitest";
import { PlanItem, PlanWeek, SeasonPlan, ShelfSession, ShelfBlock } from "~/.server/models";
import * as apiSessions from "~/routes/api/sessions";
import * as shelf from "~/routes/coach/sessions";
import * as sessionEdit from "~/routes/coach/session-edit";
import * as planNew from "~/routes/coach/plan-new";
import * as planPage from "~/routes/coach/plan";
import { fieldErrorsOf, formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const blocks = [
  { kind: "warmup", durationS: 600, target: { metric: "power", lowPct: 50, highPct: 65 } },
  {
    kind: "repeats",
    count: 4,
    work: { durationS: 480, target: { metric: "power", lowPct: 95, highPct: 99 } },
    recovery: { durationS: 240, target: { metric: "power", lowPct: 50 } },
  },
  { kind: "cooldown", durationS: 600, target: { metric: "power", lowPct: 45, highPct: 55 } },
];

async function coach() {
  const user = await makeUser({ role: "coach" });
  return { user, cookie: await signIn(user.email) };
}

function multipart(path: string, fields: Record<string, string | File>, cookie: string) {
  const body = new FormData();
  for (const [k, v] of Object.entries(fields)) body.append(k, v);
  return new Request(`http://localhost:3999${path}`, { method: "POST", body, headers: { Cookie: cookie } });
}

describe("session shelf", () => {
  it("creates, edits with reordered blocks, and finds a session by search through the JSON route", async () => {
    const { user, cookie } = await coach();
    const created = await run(
      sessionEdit.action,
      formRequest(
        "/coach/sessions/new",
        { payload: JSON.stringify({ name: "Sweet spot 3 × 12", sport: "bike", tags: ["Build", "build"], blocks }) },
        { cookie },
      ),
    );
    expect(statusOf(created)).toBe(302);
    const id = Number((created as Response).headers.get("location")!.match(/sessions\/(\d+)/)![1]);
    const session = await ShelfSession.findByPk(id);
    expect(session).toMatchObject({ ownerId: user.id, name: "Sweet spot 3 × 12" });
    expect(session!.tags).toEqual(["build"]);

    const reordered = [blocks[2], blocks[0], blocks[1]];
    await run(
      sessionEdit.action,
      formRequest(
        `/coach/sessions/${id}`,
        { payload: JSON.stringify({ name: "Sweet spot 3 × 12", sport: "bike", blocks: reordered }) },
        { cookie },
      ),
      { sessionId: String(id) },
    );
    const stored = await ShelfBlock.findAll({ where: { sessionId: id }, order: [["position", "ASC"]] });
    expect(stored.map((b) => b.kind)).toEqual(["cooldown", "warmup", "repeats"]);
    expect(stored.map((b) => b.position)).toEqual([0, 1, 2]);

    const res = (await run(apiSessions.loader, getRequest("/api/sessions?q=sweet", cookie))) as Response;
    const body = await res.json();
    expect(body.sessions.map((s: { name: string }) => s.name)).toEqual(["Sweet spot 3 × 12"]);
    expect(body.sessions[0].durationS).toBe(600 + 4 * 720 + 600);
    const byTag = await (
      (await run(apiSessions.loader, getRequest("/api/sessions?tag=build&sport=run", cookie))) as Response
    ).json();
    expect(byTag.sessions).toEqual([]);
  });

  it("the shelf page filters from its search params, keeps every tag on offer, and ignores unknown values", async () => {
    const { cookie } = await coach();
    for (const [name, sport, tags] of [
      ["Tempo hills", "bike", ["build"]],
      ["Easy spin", "bike", ["base"]],
      ["Track 6 × 800", "run", ["build"]],
    ] as const)
      await run(
        sessionEdit.action,
        formRequest("/coach/sessions/new", { payload: JSON.stringify({ name, sport, tags, blocks }) }, { cookie }),
      );
    const page = async (query: string) =>
      payloadOf(await run(shelf.loader, getRequest(`/coach/sessions${query}`, cookie)));
    const names = (p: { sessions: { name: string }[] }) => p.sessions.map((s) => s.name);

    const filtered = await page("?sport=bike&tag=build");
    expect(names(filtered)).toEqual(["Tempo hills"]);
    expect(filtered.filter).toMatchObject({ sport: "bike", tag: "build", sort: "name", archived: false });
    // The tag choices are the whole shelf's, not only the shown sessions'.
    expect(filtered.tags).toEqual(expect.arrayContaining(["base", "build"]));
    expect(names(await page("?q=TRACK"))).toEqual(["Track 6 × 800"]);
    // A hand-edited link shows the shelf instead of failing.
    const odd = await page("?sport=kayak&sort=sideways&archived=yes");
    expect(odd.filter).toMatchObject({ sport: undefined, sort: "name", archived: false });
    expect(names(odd)).toEqual(expect.arrayContaining(["Easy spin", "Tempo hills", "Track 6 × 800"]));
  });

  it("refuses invalid blocks field by field and saves nothing", async () => {
    const { user, cookie } = await coach();
    const before = await ShelfSession.count({ where: { ownerId: user.id } });
    const bad = [
      { kind: "steady", durationS: 0, target: { metric: "power", lowPct: 400 } },
      {
        kind: "repeats",
        count: 60,
        work: { durationS: 60, target: { metric: "power", lowPct: 100 } },
        recovery: { durationS: 60 },
      },
    ];
    const res = await run(
      sessionEdit.action,
      formRequest(
        "/coach/sessions/new",
        { payload: JSON.stringify({ name: "", sport: "bike", blocks: bad }) },
        { cookie },
      ),
    );
    expect(statusOf(res)).toBe(400);
    const errors = fieldErrorsOf(res);
    expect(errors.name).toMatch(/name/);
    expect(errors["blocks.0.durationS"]).toMatch(/1 second and 12 hours/);
    expect(errors["blocks.0.target.lowPct"]).toMatch(/300/);
    expect(errors["blocks.1.count"]).toMatch(/1 to 50/);
    expect(await ShelfSession.count({ where: { ownerId: user.id } })).toBe(before);
  });

  it("new coaches start with the starter shelf; duplicate; archive instead of delete when in use", async () => {
    const { action: signupAction } = await import("~/routes/signup");
    const email = `shelf.${Date.now()}@example.test`;
    await run(
      signupAction,
      formRequest("/signup", {
        name: "Shelf Coach",
        email,
        password: "long-enough-pass",
        role: "coach",
        timezone: "UTC",
      }),
    );
    const cookie = await signIn(email, "long-enough-pass");
    const starter = JSON.parse(fs.readFileSync("templates/sessions/starter.json", "utf8")).sessions.length;
    const list = payloadOf(await run(shelf.loader, getRequest("/coach/sessions", cookie)));
    expect(list.sessions).toHaveLength(starter);

    const target = list.sessions[0];
    expect(
      payloadOf(
        await run(
          shelf.action,
          formRequest("/coach/sessions", { intent: "duplicate", sessionId: String(target.id) }, { cookie }),
        ),
      ).ok,
    ).toBe(true);
    const plan = await SeasonPlan.create({
      ownerId: target.id ? (await ShelfSession.findByPk(target.id))!.ownerId : 0,
      name: "P",
      sport: "bike",
      alignment: "start",
      startDate: "2027-01-04",
      weeklyHours: 8,
      pattern: "3:1",
      testEveryWeeks: 6,
    });
    const week = await PlanWeek.create({ planId: plan.id, idx: 1, phase: "base", loadFactor: 1, plannedHours: 8 });
    await PlanItem.create({
      planId: plan.id,
      weekId: week.id,
      day: 0,
      position: 0,
      sourceSessionId: target.id,
      name: target.name,
      sport: "bike",
      blocks: [],
    });
    const removed = await run(
      shelf.action,
      formRequest("/coach/sessions", { intent: "remove", sessionId: String(target.id) }, { cookie }),
    );
    expect(payloadOf(removed).message).toMatch(/archived instead/);
    expect((await ShelfSession.findByPk(target.id))!.archived).toBe(true);
    const copy = (await ShelfSession.findOne({ where: { name: `${target.name} (copy)` } }))!;
    await run(
      shelf.action,
      formRequest("/coach/sessions", { intent: "remove", sessionId: String(copy.id) }, { cookie }),
    );
    expect(await ShelfSession.findByPk(copy.id)).toBeNull();
  });

  it("exports and imports the shelf; a malformed file changes nothing", async () => {
    const { user, cookie } = await coach();
    await run(
      sessionEdit.action,
      formRequest(
        "/coach/sessions/new",
        { payload: JSON.stringify({ name: "Export me", sport: "run", blocks: [{ kind: "open", durationS: 600 }] }) },
        { cookie },
      ),
    );
    const exported = (await run(apiSessions.loader, getRequest("/api/sessions?download=1", cookie))) as Response;
    expect(exported.headers.get("content-disposition")).toMatch(/attachment/);
    const file = await exported.text();

    const other = await coach();
    const ok = await run(
      shelf.action,
      multipart(
        "/coach/sessions",
        { intent: "import", file: new File([file], "s.json", { type: "application/json" }) },
        other.cookie,
      ),
    );
    expect(payloadOf(ok).message).toBe("Imported 1 session.");
    expect(await ShelfSession.count({ where: { ownerId: other.user.id, name: "Export me" } })).toBe(1);

    const before = await ShelfSession.count({ where: { ownerId: other.user.id } });
    const broken = JSON.parse(file);
    broken.sessions.push({
      name: "Bad",
      sport: "bike",
      blocks: [{ kind: "steady", durationS: -1, target: { metric: "power", lowPct: 90 } }],
    });
    for (const content of [
      "{not json",
      JSON.stringify({ format: "other", version: 1, sessions: [] }),
      JSON.stringify(broken),
    ]) {
      const res = await run(
        shelf.action,
        multipart("/coach/sessions", { intent: "import", file: new File([content], "s.json") }, other.cookie),
      );
      expect(statusOf(res)).toBe(400);
      expect(payloadOf(res).ok).toBe(false);
    }
    const res = await run(
      shelf.action,
      multipart(
        "/coach/sessions",
        { intent: "import", file: new File([JSON.stringify(broken)], "s.json") },
        other.cookie,
      ),
    );
    expect(payloadOf(res).details.join(" ")).toMatch(/session 2: blocks.0.durationS/);
    expect(await ShelfSession.count({ where: { ownerId: other.user.id } })).toBe(before);
    expect(user.id).not.toBe(other.user.id);
  });

  it("a coach cannot read or change another coach's session (404)", async () => {
    const a = await coach();
    const b = await coach();
    const created = await run(
      sessionEdit.action,
      formRequest(
        "/coach/sessions/new",
        { payload: JSON.stringify({ name: "Private", sport: "bike", blocks }) },
        { cookie: a.cookie },
      ),
    );
    const id = (created as Response).headers.get("location")!.match(/sessions\/(\d+)/)![1];
    expect(
      statusOf(await run(sessionEdit.loader, getRequest(`/coach/sessions/${id}`, b.cookie), { sessionId: id })),
    ).toBe(404);
    expect(
      statusOf(
        await run(
          sessionEdit.action,
          formRequest(
            `/coach/sessions/${id}`,
            { payload: JSON.stringify({ name: "Stolen", sport: "bike", blocks }) },
            { cookie: b.cookie },
          ),
          { sessionId: id },
        ),
      ),
    ).toBe(404);
    expect(
      statusOf(
        await run(
          shelf.action,
          formRequest("/coach/sessions", { intent: "remove", sessionId: id }, { cookie: b.cookie }),
        ),
      ),
    ).toBe(404);
    expect((await ShelfSession.findByPk(Number(id)))!.name).toBe("Private");
  });
});

describe("season plans", () => {
  async function newPlan(cookie: string, fields: Record<string, string> = {}) {
    const res = await run(
      planNew.action,
      formRequest(
        "/coach/plans/new",
        {
          name: "Spring build",
          sport: "bike",
          alignment: "event",
          date: "2027-04-18",
          weeks: "16",
          weeklyHours: "10",
          pattern: "3:1",
          testEveryWeeks: "6",
          ...fields,
        },
        { cookie },
      ),
    );
    expect(statusOf(res)).toBe(302);
    return Number((res as Response).headers.get("location")!.match(/plans\/(\d+)/)![1]);
  }

  it("16 weeks ending on an event: recovery every 4th week, a taper, tests right after recovery weeks with a test session placed", async () => {
    const { cookie } = await coach();
    const planId = await newPlan(cookie);
    const page = payloadOf(
      await run(planPage.loader, getRequest(`/coach/plans/${planId}`, cookie), { planId: String(planId) }),
    );
    expect(page.weeks).toHaveLength(16);
    expect(page.plan.eventDate).toBe("2027-04-18");
    expect(page.weeks.filter((w: { recovery: boolean }) => w.recovery).map((w: { idx: number }) => w.idx)).toEqual([
      4, 8, 12,
    ]);
    expect(page.weeks.filter((w: { phase: string }) => w.phase === "taper").map((w: { idx: number }) => w.idx)).toEqual(
      [14, 15],
    );
    expect(page.weeks.at(-1).phase).toBe("race");
    const testWeeks = page.weeks.filter((w: { test: boolean }) => w.test);
    // Rest, then test: week 9 follows recovery week 8; week 13 is the peak's only loading week, so no test there.
    expect(testWeeks.map((w: { idx: number }) => w.idx)).toEqual([1, 9]);
    const testItems = page.items.filter((i: { testProtocol: string | null }) => i.testProtocol === "twenty_minute");
    expect(testItems.map((i: { weekId: number }) => i.weekId).sort()).toEqual(
      testWeeks.map((w: { id: number }) => w.id).sort(),
    );
  });

  it("refuses a bad plan form and creates nothing", async () => {
    const { user, cookie } = await coach();
    const res = await run(
      planNew.action,
      formRequest(
        "/coach/plans/new",
        {
          name: "",
          sport: "bike",
          alignment: "event",
          date: "2027-02-30",
          weeks: "2",
          weeklyHours: "0",
          pattern: "4:1",
          testEveryWeeks: "6",
        },
        { cookie },
      ),
    );
    expect(statusOf(res)).toBe(400);
    const e = fieldErrorsOf(res);
    expect(Object.keys(e)).toEqual(expect.arrayContaining(["name", "weeks", "weeklyHours", "pattern"]));
    expect(await SeasonPlan.count({ where: { ownerId: user.id } })).toBe(0);
  });

  it("edits a week and resizes a phase; version moves on", async () => {
    const { cookie } = await coach();
    const planId = await newPlan(cookie, { weeks: "12" });
    const before = (await SeasonPlan.findByPk(planId))!.version;
    const week = (await PlanWeek.findOne({ where: { planId, idx: 2 } }))!;
    const res = await run(
      planPage.action,
      formRequest(
        `/coach/plans/${planId}`,
        {
          intent: "week",
          weekId: String(week.id),
          phase: "build",
          test: "on",
          plannedHours: "7.5",
          notes: "Camp week",
        },
        { cookie },
      ),
      { planId: String(planId) },
    );
    expect(payloadOf(res)).toMatchObject({ status: "success", message: "Week saved." });
    await week.reload();
    expect(week).toMatchObject({ phase: "build", test: true, recovery: false, plannedHours: 7.5, notes: "Camp week" });
    await run(
      planPage.action,
      formRequest(
        `/coach/plans/${planId}`,
        { intent: "phase-range", phase: "peak", fromWeek: "8", toWeek: "9" },
        { cookie },
      ),
      { planId: String(planId) },
    );
    expect((await PlanWeek.findAll({ where: { planId, phase: "peak" } })).map((w) => w.idx).sort()).toEqual([8, 9]);
    expect((await SeasonPlan.findByPk(planId))!.version).toBe(before + 2);
    const bad = await run(
      planPage.action,
      formRequest(
        `/coach/plans/${planId}`,
        { intent: "phase-range", phase: "peak", fromWeek: "8", toWeek: "40" },
        { cookie },
      ),
      { planId: String(planId) },
    );
    expect(statusOf(bad)).toBe(400);
  });

  it("expands a recurring session with rrule across a month end, each occurrence its own item", async () => {
    const { user, cookie } = await coach();
    const session = await ShelfSession.create({ ownerId: user.id, name: "Tempo", sport: "bike" });
    await ShelfBlock.create({
      sessionId: session.id,
      position: 0,
      kind: "steady",
      spec: { kind: "steady", durationS: 3600, target: { metric: "power", lowPct: 80, highPct: 85 } },
    });
    // Starts Monday 2027-01-04; weeks 4–5 run 25 Jan – 7 Feb, across the month end.
    const planId = await newPlan(cookie, { alignment: "start", date: "2027-01-04", weeks: "10" });
    const res = await run(
      planPage.action,
      formRequest(
        `/coach/plans/${planId}`,
        {
          intent: "recurrence",
          sessionId: String(session.id),
          days: ["1", "6"],
          fromWeek: "4",
          toWeek: "5",
          timeOfDay: "06:30",
        },
        { cookie },
      ),
      { planId: String(planId) },
    );
    expect(payloadOf(res).message).toBe("Added 4 sessions: every Tue and Sun, weeks 4–5.");
    const items = await PlanItem.findAll({ where: { planId, sourceSessionId: session.id }, order: [["id", "ASC"]] });
    const weeks = new Map((await PlanWeek.findAll({ where: { planId } })).map((w) => [w.id, w.idx]));
    // Tue 26 Jan, Sun 31 Jan (week 4); Tue 2 Feb, Sun 7 Feb (week 5).
    expect(items.map((i) => [weeks.get(i.weekId), i.day])).toEqual([
      [4, 1],
      [4, 6],
      [5, 1],
      [5, 6],
    ]);
    expect(items.every((i) => i.timeOfDay === "06:30" && i.recurrenceId !== null)).toBe(true);
    const noDays = await run(
      planPage.action,
      formRequest(
        `/coach/plans/${planId}`,
        { intent: "recurrence", sessionId: String(session.id), fromWeek: "4", toWeek: "5" },
        { cookie },
      ),
      { planId: String(planId) },
    );
    expect(statusOf(noDays)).toBe(400);
    expect(fieldErrorsOf(noDays).days).toMatch(/at least one day/);
    expect(await PlanItem.count({ where: { planId, sourceSessionId: session.id } })).toBe(4);
  });

  it("a coach cannot read or change another coach's plan (404)", async () => {
    const a = await coach();
    const b = await coach();
    const planId = await newPlan(a.cookie);
    expect(
      statusOf(await run(planPage.loader, getRequest(`/coach/plans/${planId}`, b.cookie), { planId: String(planId) })),
    ).toBe(404);
    const week = (await PlanWeek.findOne({ where: { planId } }))!;
    const res = await run(
      planPage.action,
      formRequest(
        `/coach/plans/${planId}`,
        { intent: "week", weekId: String(week.id), phase: "race", plannedHours: "1" },
        { cookie: b.cookie },
      ),
      { planId: String(planId) },
    );
    expect(statusOf(res)).toBe(404);
    await week.reload();
    expect(week.phase).toBe("base");
  });
});
