import ICAL from "ical.js";
import nodeIcal from "node-ical";
import { describe, expect, it } from "vitest";
import { CoachAthlete, ScheduledSession, Threshold, User } from "~/.server/models";
import { buildFeed } from "~/.server/services/feed-calendar";
import * as feedPage from "~/routes/athlete/feed";
import { fieldErrorsOf, formRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

/** Tuesday 2027-06-08 (summer time in Berlin, UTC+2), Saturday 2027-06-12, Thursday 2027-01-14 (winter, UTC+1). */
async function scenario() {
  const coach = await makeUser({ role: "coach" });
  const athlete = await makeUser({ role: "athlete", timezone: "Europe/Berlin", name: "Lena Ott" });
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
  const make = (date: string, name: string, extra: Partial<ScheduledSession> = {}) =>
    ScheduledSession.create({
      athleteId: athlete.id,
      date,
      name,
      sport: "bike",
      plannedDurationS: 75 * 60,
      ...extra,
    } as never);
  const tue = await make("2027-06-08", "Tempo 2 × 20", {
    description: "Rolling course.",
    notes: "Eat before.",
  } as never);
  const sat = await make("2027-06-12", "Long ride");
  const thu = await make("2027-01-14", "Cadence drills with a very long name that no phone calendar can show whole");
  const done = await make("2027-06-10", "Sweet spot", { status: "done", effortScore: 6, actualMinutes: 70 } as never);
  const skipped = await make("2027-06-11", "Openers", { status: "skipped" } as never);
  return { coach, athlete, tue, sat, thu, done, skipped };
}
const NOW = new Date("2027-01-01T12:00:00Z");

describe("feed with usual training times", () => {
  it("the athlete sets a time per weekday; invalid times are refused and change nothing", async () => {
    const { athlete } = await scenario();
    const cookie = await signIn(athlete.email);
    const bad = await run(
      feedPage.action,
      formRequest("/athlete/feed", { intent: "times", "time-1": "25:00" }, { cookie }),
    );
    expect(statusOf(bad)).toBe(400);
    expect(fieldErrorsOf(bad)).toEqual({
      form: "Check the times.",
      "time-1": "Use a time like 06:30, or leave it empty for all day.",
    });
    expect((await User.findByPk(athlete.id))!.trainingTimes).toBeNull();
    const ok = await run(
      feedPage.action,
      formRequest("/athlete/feed", { intent: "times", "time-1": "06:30", "time-3": "18:15" }, { cookie }),
    );
    expect(payloadOf(ok)).toMatchObject({
      status: "success",
      message: "Saved. Sessions on those days get a start time and a length in your calendar.",
    });
    expect((await User.findByPk(athlete.id))!.trainingTimes).toEqual([null, "06:30", null, "18:15", null, null, null]);
  });

  it("timed events carry DTSTART in the athlete's zone and a DURATION (ical.js and node-ical agree); days without a time stay all-day", async () => {
    const { athlete, tue, sat, thu } = await scenario();
    await athlete.update({ trainingTimes: [null, "06:30", null, "18:15", null, null, null] });
    const { body } = await buildFeed((await User.findByPk(athlete.id))!, NOW);
    const unfolded = body.replace(/\r\n /g, "");
    expect(unfolded).toMatch(/DTSTART;TZID=Europe\/Berlin:20270608T063000\r\nDURATION:PT75M/);
    expect(body).not.toMatch(/DTEND;TZID/);

    const comp = new ICAL.Component(ICAL.parse(body));
    // ical.js resolves TZID only through zones it knows: the feed's own VTIMEZONE is registered first.
    for (const vtz of comp.getAllSubcomponents("vtimezone")) ICAL.TimezoneService.register(vtz);
    const byUid = (id: number) =>
      new ICAL.Event(
        comp.getAllSubcomponents("vevent").find((e) => e.getFirstPropertyValue("uid") === `session-${id}@pacewright`)!,
      );
    const t = byUid(tue.id);
    expect(t.startDate.isDate).toBe(false);
    expect([t.startDate.hour, t.startDate.minute]).toEqual([6, 30]);
    expect(t.startDate.zone.tzid).toBe("Europe/Berlin");
    expect(t.duration.toSeconds()).toBe(75 * 60);
    // Summer time: 06:30 in Berlin is 04:30 UTC; winter: 18:15 is 17:15 UTC.
    expect(t.startDate.toJSDate().toISOString()).toBe("2027-06-08T04:30:00.000Z");
    expect(byUid(thu.id).startDate.toJSDate().toISOString()).toBe("2027-01-14T17:15:00.000Z");
    expect(byUid(sat.id).startDate.isDate).toBe(true);

    const parsed = Object.values(nodeIcal.sync.parseICS(body)).filter((e) => e?.type === "VEVENT") as any[];
    const n = parsed.find((e) => e.uid === `session-${tue.id}@pacewright`);
    expect((n.start as Date).toISOString()).toBe("2027-06-08T04:30:00.000Z");
    expect(((n.end as Date).getTime() - (n.start as Date).getTime()) / 1000).toBe(75 * 60);
    expect(parsed.find((e) => e.uid === `session-${sat.id}@pacewright`).datetype).toBe("date");
  });

  it("titles are short, done and skipped sessions say so, and the description carries the session's text and the coach's note", async () => {
    const { athlete, tue, thu, done, skipped } = await scenario();
    const { body } = await buildFeed(athlete, NOW);
    const comp = new ICAL.Component(ICAL.parse(body));
    const ev = (id: number) =>
      comp.getAllSubcomponents("vevent").find((e) => e.getFirstPropertyValue("uid") === `session-${id}@pacewright`)!;
    const summary = (id: number) => String(ev(id).getFirstPropertyValue("summary"));
    expect(summary(thu.id).length).toBeLessThanOrEqual(48);
    expect(summary(thu.id).endsWith("…")).toBe(true);
    expect(summary(done.id)).toBe("✓ Sweet spot");
    expect(summary(skipped.id)).toBe("Skipped: Openers");
    expect(String(ev(done.id).getFirstPropertyValue("description"))).toMatch(/^Done: 70 min, effort 6 of 10\./);
    const desc = String(ev(tue.id).getFirstPropertyValue("description"));
    expect(desc).toContain("Rolling course.");
    expect(desc).toContain("Note from the coach: Eat before.");
  });
});
