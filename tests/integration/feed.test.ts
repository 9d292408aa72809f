import ICAL from "ical.js";
import nodeIcal from "node-ical";
import { describe, expect, it } from "vitest";
import { CoachAthlete, FeedToken, ScheduledSession, Threshold, User } from "~/.server/models";
import { applyBoardOp } from "~/.server/services/board";
import { assignPlan } from "~/.server/services/materialize";
import { createPlan } from "~/.server/services/plans";
import { moveSession } from "~/.server/services/calendar";
import { rotateFeed, revokeFeed, FEED_RATE } from "~/.server/services/feed";
import { saveTest } from "~/.server/services/field-tests";
import { PlanItem, PlanWeek, ShelfSession, ShelfBlock } from "~/.server/models";
import * as feed from "~/routes/feed";
import * as feedPage from "~/routes/athlete/feed";
import { addDays, mondayOf, todayIn } from "~/lib/dates";
import { fieldErrorsOf, formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const BASE = "http://localhost:3999";

async function scenario(timezone = "Europe/Berlin") {
  const coach = await makeUser({ role: "coach" });
  const athlete = await makeUser({ role: "athlete", timezone, name: "Rider; with, odd\nname" });
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
  const s = await ShelfSession.create({ ownerId: coach.id, name: "Threshold; repeats, hard", sport: "bike" });
  await ShelfBlock.bulkCreate([
    {
      sessionId: s.id,
      position: 0,
      kind: "warmup",
      spec: { kind: "warmup", durationS: 600, target: { metric: "power", lowPct: 50, highPct: 65 } },
    },
    {
      sessionId: s.id,
      position: 1,
      kind: "repeats",
      spec: {
        kind: "repeats",
        count: 4,
        work: { durationS: 480, target: { metric: "power", lowPct: 95, highPct: 99 } },
        recovery: { durationS: 240, target: { metric: "power", lowPct: 50 } },
      },
    },
  ]);
  // Starts the Monday before 2027-03-22, so weeks 1 and 2 straddle the 28 March 2027 change to summer time in Europe.
  const start = "2027-03-15";
  const plan = await createPlan(coach.id, {
    name: "Feed",
    sport: "bike",
    description: "",
    alignment: "start",
    date: start,
    weeks: 4,
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  await PlanItem.destroy({ where: { planId: plan.id } });
  const weeks = await PlanWeek.findAll({ where: { planId: plan.id }, order: [["idx", "ASC"]] });
  for (const w of weeks.slice(0, 3)) {
    const r = await applyBoardOp(coach.id, plan.id, {
      op: "copy",
      sessionId: s.id,
      toWeek: w.id,
      toDay: 5,
      toIndex: 0,
    });
    if (w.idx <= 2)
      await applyBoardOp(coach.id, plan.id, {
        op: "time",
        itemId: r.items.find((i) => i.weekId === w.id)!.id,
        timeOfDay: "07:30",
      });
  }
  // A session near today too, so the feed's window of −8 weeks … +1 year always has something.
  const near = mondayOf(todayIn(timezone));
  await assignPlan(coach, plan.id, [athlete.id], {
    mode: "start",
    date: start,
    choice: { overlap: "alongside", confirmSports: true, confirmTests: true },
  });
  await assignPlan(coach, plan.id, [athlete.id], {
    mode: "start",
    date: near,
    choice: { overlap: "alongside", confirmSports: true, confirmTests: true },
  });
  const token = await rotateFeed(athlete.id);
  return { coach, athlete, token };
}

async function fetchFeed(token: string, headers: Record<string, string> = {}, method = "GET") {
  return (await run(feed.loader, new Request(`${BASE}/feed/${token}.ics`, { method, headers }), {
    file: `${token}.ics`,
  })) as Response;
}

describe("calendar feed", () => {
  it("is valid iCalendar for two independent parsers, per RFC 5545", async () => {
    const { token, athlete } = await scenario();
    const res = await fetchFeed(token);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("text/calendar; charset=utf-8");
    expect(res.headers.get("cache-control")).toMatch(/^private/);
    const text = await res.text();
    // CRLF line ends and lines folded at 75 octets (RFC 5545 §3.1).
    expect(text).toMatch(/\r\n/);
    expect(text.replace(/\r\n/g, "").includes("\n")).toBe(false);
    for (const line of text.split("\r\n")) expect(Buffer.byteLength(line, "utf8")).toBeLessThanOrEqual(75);
    // Escaped commas and semicolons in the summary (§3.3.11).
    // Titles are the session's name alone; targets are in the description.
    expect(text.replace(/\r\n /g, "")).toContain("SUMMARY:Threshold\\; repeats\\, hard\r\n");
    expect(text).toMatch(/DTSTAMP:\d{8}T\d{6}Z/);
    expect(text).toContain("BEGIN:VTIMEZONE");
    expect(text).toContain("TZID:Europe/Berlin");
    expect(text).toMatch(/REFRESH-INTERVAL;VALUE=DURATION:PT1H/);

    const jcal = ICAL.parse(text);
    const comp = new ICAL.Component(jcal);
    const events = comp.getAllSubcomponents("vevent");
    expect(events.length).toBeGreaterThanOrEqual(6);
    const parsed = nodeIcal.sync.parseICS(text);
    const nodeEvents = Object.values(parsed).filter((e) => e?.type === "VEVENT");
    expect(nodeEvents).toHaveLength(events.length);

    // Timed sessions keep 07:30 local on both sides of the daylight-saving change (27 Mar: UTC+1; 3 Apr: UTC+2).
    const ev = (date: string) =>
      nodeEvents.find((e: any) => (e.start as Date).toISOString().slice(0, 10) === date) as any;
    expect(ev("2027-03-20").start.toISOString()).toBe("2027-03-20T06:30:00.000Z");
    expect(ev("2027-03-27").start.toISOString()).toBe("2027-03-27T06:30:00.000Z");
    const timed = events.find((e) => e.getFirstPropertyValue("dtstart")!.toString().startsWith("2027-03-27"))!;
    expect(timed.getFirstProperty("dtstart")!.getParameter("tzid")).toBe("Europe/Berlin");
    // Untimed sessions are all-day DATE values.
    const allDay = events.find((e) => (e.getFirstPropertyValue("dtstart") as ICAL.Time).isDate)!;
    expect(allDay).toBeTruthy();
    expect(text).toMatch(/DTSTART;VALUE=DATE:\d{8}/);
    // Description lists every block with %, its intensity band and a link; athlete name newline is never a raw line break.
    const desc = String(timed.getFirstPropertyValue("description"));
    expect(desc).toContain("4 × 8 min at 238–248 W");
    expect(desc).toMatch(/95–99 % of threshold, Ridge band/);
    expect(desc).toContain(`${BASE}/athlete/sessions/`);
    expect(String(comp.getFirstPropertyValue("x-wr-calname"))).toBe(`Pacewright · ${athlete.name.replace("\n", " ")}`);
  });

  it("follows a rescale (same UID, higher SEQUENCE, new watts) and a move (new date)", async () => {
    const { token, athlete } = await scenario();
    const first = new ICAL.Component(ICAL.parse(await (await fetchFeed(token)).text()));
    const future = (await ScheduledSession.findAll({ where: { athleteId: athlete.id }, order: [["date", "DESC"]] }))[0];
    const uid = `session-${future.id}@pacewright`;
    const find = (c: ICAL.Component) =>
      c.getAllSubcomponents("vevent").find((e) => e.getFirstPropertyValue("uid") === uid)!;
    const before = find(first);
    expect(Number(before.getFirstPropertyValue("sequence"))).toBe(0);
    await saveTest(athlete, athlete, {
      protocol: "manual",
      inputs: { sport: "bike", metric: "power", value: "300" },
      testedOn: todayIn(athlete.timezone),
      confirmed: true,
    });
    const second = find(new ICAL.Component(ICAL.parse(await (await fetchFeed(token)).text())));
    expect(Number(second.getFirstPropertyValue("sequence"))).toBe(1);
    expect(String(second.getFirstPropertyValue("description"))).toContain("285–297 W");
    await moveSession(athlete.id, future.id, addDays(future.date, 1));
    const third = find(new ICAL.Component(ICAL.parse(await (await fetchFeed(token)).text())));
    expect(Number(third.getFirstPropertyValue("sequence"))).toBe(2);
    expect(third.getFirstPropertyValue("dtstart")!.toString().slice(0, 10)).toBe(addDays(future.date, 1));
  });

  it("answers 304 to a matching ETag or Last-Modified, supports HEAD, and limits requests per token", async () => {
    const { token } = await scenario();
    const res = await fetchFeed(token);
    const etag = res.headers.get("etag")!;
    expect((await fetchFeed(token, { "If-None-Match": etag })).status).toBe(304);
    expect((await fetchFeed(token, { "If-Modified-Since": res.headers.get("last-modified")! })).status).toBe(304);
    expect((await fetchFeed(token, { "If-None-Match": '"other"' })).status).toBe(200);
    const head = await fetchFeed(token, {}, "HEAD");
    expect(head.status).toBe(200);
    expect(await head.text()).toBe("");
    let last = 200;
    for (let i = 0; i < FEED_RATE.requests; i++) last = (await fetchFeed(token)).status;
    expect(last).toBe(429);
  });

  it("gives 404 without a hint for revoked, rotated, malformed and unknown tokens, and never shows another athlete", async () => {
    const { token, athlete } = await scenario();
    const other = await scenario();
    const body = await (await fetchFeed(other.token)).text();
    expect(body).not.toContain(
      `session-${(await ScheduledSession.findOne({ where: { athleteId: athlete.id } }))!.id}@`,
    );
    const rotated = await rotateFeed(athlete.id);
    expect((await fetchFeed(token)).status).toBe(404);
    expect((await fetchFeed(rotated)).status).toBe(200);
    await revokeFeed(athlete.id);
    const revoked = await fetchFeed(rotated);
    expect(revoked.status).toBe(404);
    const malformed = ["x", "../../etc/passwd", "a".repeat(43), `${rotated}x`];
    for (const t of malformed) {
      const r = await fetchFeed(t);
      expect(r.status).toBe(404);
      expect(await r.text()).toBe("Not found");
    }
    const noSuffix = (await run(feed.loader, new Request(`${BASE}/feed/${rotated}`), { file: rotated })) as Response;
    expect(noSuffix.status).toBe(404);
    expect(await FeedToken.count({ where: { userId: athlete.id, revokedAt: null } })).toBe(0);
  });

  it("the settings page makes, rotates and revokes links, and sets a reminder alarm", async () => {
    const { athlete } = await scenario();
    const cookie = await signIn(athlete.email);
    const page = payloadOf(await run(feedPage.loader, getRequest("/athlete/feed", cookie)));
    expect(page.feed.webcal).toMatch(/^webcal:\/\/localhost:3999\/feed\/[A-Za-z0-9_-]{43}\.ics$/);
    expect(page.feed.qrSvg).toMatch(/^<svg/);
    expect(
      payloadOf(
        await run(feedPage.action, formRequest("/athlete/feed", { intent: "alarm", alarmMinutes: "30" }, { cookie })),
      ),
    ).toMatchObject({ status: "success", message: "Reminders 30 minutes before timed sessions." });
    const token = page.feed.https.match(/feed\/(.+)\.ics/)![1];
    const text = await (await fetchFeed(token)).text();
    expect(text).toContain("BEGIN:VALARM");
    expect(text).toContain("TRIGGER:-PT30M");
    const badAlarm = await run(
      feedPage.action,
      formRequest("/athlete/feed", { intent: "alarm", alarmMinutes: "7" }, { cookie }),
    );
    expect(statusOf(badAlarm)).toBe(400);
    expect(fieldErrorsOf(badAlarm)).toEqual({ alarmMinutes: "Choose a reminder from the list." });
    expect((await User.findByPk(athlete.id))!.feedAlarmMinutes).toBe(30);
    await run(feedPage.action, formRequest("/athlete/feed", { intent: "revoke" }, { cookie }));
    expect(payloadOf(await run(feedPage.loader, getRequest("/athlete/feed", cookie))).feed).toBeNull();
  });

  it("a coach's feed lists their athletes' field tests and key sessions", async () => {
    const { coach, athlete } = await scenario();
    await ScheduledSession.create({
      athleteId: athlete.id,
      date: todayIn("UTC"),
      name: "20-minute field test",
      sport: "bike",
      testProtocol: "twenty_minute",
    });
    const token = await rotateFeed(coach.id);
    const events = new ICAL.Component(ICAL.parse(await (await fetchFeed(token)).text())).getAllSubcomponents("vevent");
    const summaries = events.map((e) => String(e.getFirstPropertyValue("summary")));
    expect(summaries).toContain(`${athlete.name.replace("\n", " ")}: 20-minute field test`);
    expect(
      String(
        events
          .find((e) => String(e.getFirstPropertyValue("summary")).includes("field test"))!
          .getFirstPropertyValue("description"),
      ),
    ).toContain("FIELD TEST:");
    // Ordinary sessions below the key-session load stay out of the coach's feed.
    expect(summaries.some((x) => x.includes("Threshold; repeats"))).toBe(false);
  });
});
