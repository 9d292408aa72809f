import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { db } from "~/.server/db";
import { ScheduledSession, User } from "~/.server/models";
import { buildFeed } from "~/.server/services/feed-calendar";
import { makeUser } from "./helpers";

/**
 * The feed text, byte for byte, against the text the earlier generation path (events with an end time whose DTEND
 * was then replaced, sessions read through the model) wrote for the same sessions: timed events on both sides of
 * both daylight-saving changes, all-day events, a reminder alarm, done and skipped sessions. Database ids and the
 * app's address are the only parts normalised. Set FEED_GOLDEN_WRITE=1 to write the file again (only from a
 * generation path already known to be right).
 */
const GOLDEN = path.join(path.dirname(new URL(import.meta.url).pathname), "golden", "feed-berlin.ics");
const NOW = new Date("2026-03-20T09:00:00Z");

describe("feed text", () => {
  it("is byte-identical to the earlier generation path's", async () => {
    const athlete = await makeUser({ role: "athlete", timezone: "Europe/Berlin" });
    await User.update(
      { feedAlarmMinutes: 30, trainingTimes: [null, "06:15", null, null, null, "17:45", null] },
      { where: { id: athlete.id } },
    );
    const days = [
      "2026-03-27",
      "2026-03-28",
      "2026-03-29",
      "2026-03-30",
      "2026-03-31",
      "2026-10-24",
      "2026-10-25",
      "2026-10-26",
      "2026-10-27",
      "2026-03-21",
    ];
    const made: number[] = [];
    for (const [i, date] of days.entries()) {
      const s = await ScheduledSession.create({
        athleteId: athlete.id,
        date,
        timeOfDay: i % 3 === 0 ? "07:30" : null,
        name: i === 4 ? "Long ride, with a very long name that the title has to shorten; and commas" : `Ride ${i}`,
        sport: "bike",
        plannedDurationS: 1800 + i * 600,
        status: i === 9 ? "done" : i === 8 ? "skipped" : "planned",
        effortScore: i === 9 ? 6 : null,
        actualMinutes: i === 9 ? 55 : null,
        notes: i === 2 ? "Keep it easy:\nspin only." : "",
      } as never);
      made.push(s.id);
    }
    await db().query("UPDATE scheduled_sessions SET updated_at = :at WHERE athlete_id = :id", {
      replacements: { at: new Date("2026-03-19T08:00:00Z"), id: athlete.id },
    });
    const owner = (await User.findByPk(athlete.id))!;
    const { body } = await buildFeed(owner, NOW);
    const byOrder = new Map(made.map((id, k) => [String(id), String(k + 1)]));
    const text = body
      .replaceAll(`Pacewright · ${owner.name}`, "Pacewright · ATHLETE")
      .replace(/session-(\d+)@/g, (_, id) => `session-${byOrder.get(id)}@`)
      .replace(/\/sessions\/(\d+)/g, (_, id) => `/sessions/${byOrder.get(id)}`)
      .replace(/https?:\/\/[^/\s]+/g, "APP");
    if (process.env.FEED_GOLDEN_WRITE === "1") fs.writeFileSync(GOLDEN, text);
    expect(text).toBe(fs.readFileSync(GOLDEN, "utf8"));
  });
});
