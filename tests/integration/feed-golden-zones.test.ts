import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { db } from "~/.server/db";
import { CoachAthlete, ScheduledSession, User } from "~/.server/models";
import { buildFeed } from "~/.server/services/feed-calendar";
import { makeUser } from "./helpers";

/**
 * A coach's feed over athletes in five zones, byte for byte, against the text the TZDate-based generation path
 * wrote before the feed computed zone offsets itself: times inside the spring gap and the autumn overlap of
 * Berlin, New York and Lord Howe (whose clocks move by half an hour), a zone without daylight saving and UTC.
 * Ids and the app's address are the only parts normalised. FEED_GOLDEN_WRITE=1 writes the file again (only from
 * a generation path already known to be right).
 */
const GOLDEN = path.join(path.dirname(new URL(import.meta.url).pathname), "golden", "feed-coach-zones.ics");
const NOW = new Date("2026-03-01T12:00:00Z");

const ZONES = {
  "Europe/Berlin": ["2026-03-29", "2026-10-25", "2026-03-28", "2026-10-26"],
  "America/New_York": ["2026-03-08", "2026-11-01", "2026-03-07", "2026-11-02"],
  "Australia/Lord_Howe": ["2026-04-05", "2026-10-04", "2026-04-04", "2026-10-03"],
  "Asia/Kolkata": ["2026-03-29", "2026-06-01"],
  UTC: ["2026-03-29", "2026-10-25"],
} as const;
// Every half hour from 00:00 to 03:30 covers each gap and overlap above; then a morning and an evening time.
const TIMES = ["00:00", "00:30", "01:00", "01:30", "02:00", "02:15", "02:30", "03:00", "03:30", "06:45", "21:10"];

describe("coach feed text across zones", () => {
  it("is byte-identical to the TZDate-based generation path's", async () => {
    const coach = await makeUser({ role: "coach", name: "Coach Zones", timezone: "Europe/Berlin" });
    const made: number[] = [];
    for (const [zone, days] of Object.entries(ZONES)) {
      const athlete = await makeUser({ role: "athlete", name: `Athlete ${zone}`, timezone: zone });
      await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
      for (const date of days)
        for (const [i, time] of TIMES.entries()) {
          const s = await ScheduledSession.create({
            athleteId: athlete.id,
            date,
            timeOfDay: time,
            position: i,
            name: `Key ride ${time}`,
            sport: "bike",
            plannedDurationS: 3600 + i * 60,
            plannedLoad: 400,
          } as never);
          made.push(s.id);
        }
      // One untimed key session per athlete: an all-day event beside the timed ones.
      const allDay = await ScheduledSession.create({
        athleteId: athlete.id,
        date: days[0],
        position: TIMES.length,
        name: "All-day key ride",
        sport: "bike",
        plannedLoad: 400,
      } as never);
      made.push(allDay.id);
    }
    await db().query("UPDATE scheduled_sessions SET updated_at = :at WHERE id IN (:ids)", {
      replacements: { at: new Date("2026-02-27T08:00:00Z"), ids: made },
    });
    const owner = (await User.findByPk(coach.id))!;
    const { body, count } = await buildFeed(owner, NOW);
    expect(count).toBe(made.length);
    const byOrder = new Map(made.map((id, k) => [String(id), String(k + 1)]));
    const text = body
      .replace(/session-(\d+)@/g, (_, id) => `session-${byOrder.get(id)}@`)
      .replace(/\/sessions\/(\d+)/g, (_, id) => `/sessions/${byOrder.get(id)}`)
      .replace(/\/athletes\/(\d+)/g, "/athletes/ID")
      .replace(/https?:\/\/[^/\s]+/g, "APP");
    if (process.env.FEED_GOLDEN_WRITE === "1") fs.writeFileSync(GOLDEN, text);
    expect(text).toBe(fs.readFileSync(GOLDEN, "utf8"));
  });
});
