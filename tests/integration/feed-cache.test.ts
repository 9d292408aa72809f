import { describe, expect, it, vi } from "vitest";
import { RouterContextProvider } from "react-router";
import { BandSetRow, CoachAthlete, FeedToken, ScheduledSession, User } from "~/.server/models";
import * as feedService from "~/.server/services/feed";
import * as feedCalendar from "~/.server/services/feed-calendar";
import { cachedFeed, feedFingerprint } from "~/.server/services/feed-cache";
import { noteFeedUse, rotateFeed } from "~/.server/services/feed";
import { hashToken } from "~/.server/tokens";
import { todayIn } from "~/lib/dates";
import * as feed from "~/routes/feed";
import { makeUser } from "./helpers";

const fetchFeed = async (token: string) =>
  (await feed.loader({
    request: new Request(`http://localhost:3999/feed/${token}.ics`),
    params: { file: `${token}.ics` },
    context: new RouterContextProvider(),
  } as never)) as Response;

async function athleteWithFeed() {
  const athlete = await makeUser({ role: "athlete", timezone: "Europe/Berlin" });
  await ScheduledSession.create({
    athleteId: athlete.id,
    date: todayIn(athlete.timezone),
    name: "Easy spin",
    sport: "bike",
    plannedDurationS: 3600,
  } as never);
  return { athlete, token: await rotateFeed(athlete.id) };
}

describe("feed cache and use notes", () => {
  it("notes a link's use at most once an hour", async () => {
    const { token } = await athleteWithFeed();
    const tokenHash = hashToken(token);
    const row = () => FeedToken.findOne({ where: { tokenHash } });
    expect((await fetchFeed(token)).status).toBe(200);
    await vi.waitFor(async () => expect((await row())!.lastUsedAt).not.toBeNull());
    const first = (await row())!.lastUsedAt!.getTime();
    for (let i = 0; i < 5; i++) expect((await fetchFeed(token)).status).toBe(200);
    await noteFeedUse(tokenHash);
    expect((await row())!.lastUsedAt!.getTime()).toBe(first);
    // An hour and a minute later the next request moves it on.
    const later = new Date(first + 61 * 60 * 1000);
    await noteFeedUse(tokenHash, later);
    expect((await row())!.lastUsedAt!.getTime()).toBe(later.getTime());
  });

  it("lets exactly the limit's worth of parallel polls through, each counted once, and answers the owner's own feed", async () => {
    const { athlete, token } = await athleteWithFeed();
    const other = await athleteWithFeed();
    const statuses = await Promise.all(Array.from({ length: 70 }, () => fetchFeed(token).then((r) => r.status)));
    // FEED_RATE is LIMITS.feedToken: 60 requests per 10 minutes (common practice for polling clients).
    expect(statuses.filter((s) => s === 200)).toHaveLength(feedService.FEED_RATE.requests);
    expect(statuses.filter((s) => s === 429)).toHaveLength(70 - feedService.FEED_RATE.requests);
    const mine = await (await fetchFeed(other.token)).text();
    expect(mine).toContain(`Pacewright · ${other.athlete.name}`);
    expect((await feedService.feedLink(other.token))!.owner.id).toBe(other.athlete.id);
    expect((await feedService.feedLink(token))!.owner.id).toBe(athlete.id);
  });

  it("rebuilds a changed feed once however many requests arrive together, and serves the rebuilt body to all", async () => {
    const { athlete } = await athleteWithFeed();
    const owner = (await User.findByPk(athlete.id))!;
    const build = vi.spyOn(feedCalendar, "buildFeed");
    const fingerprint = await feedFingerprint(owner);
    globalThis.__pacewrightFeedCache?.clear();
    const bodies = await Promise.all(Array.from({ length: 8 }, () => cachedFeed(owner, fingerprint)));
    expect(new Set(bodies.map((b) => b.body)).size).toBe(1);
    expect(bodies[0].body).toContain("Easy spin");
    expect(globalThis.__pacewrightFeedBuilds?.size ?? 0).toBe(0);
    // Served from the cache now; a new fingerprint (a change) builds again.
    await cachedFeed(owner, fingerprint);
    expect(globalThis.__pacewrightFeedCache!.get(owner.id)!.fingerprint).toBe(fingerprint);
    build.mockRestore();
  });

  it("moves the fingerprint on when the coach's band sets change, for the coach and their athlete, and not for others", async () => {
    const { athlete } = await athleteWithFeed();
    const coach = await makeUser({ role: "coach" });
    const loner = (await athleteWithFeed()).athlete;
    const prints = async () =>
      Promise.all([athlete, coach, loner].map(async (u) => feedFingerprint((await User.findByPk(u.id))!)));
    const before = await prints();
    await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
    const linked = await prints();
    expect(linked[0]).not.toBe(before[0]); // the athlete's bands now come from the coach
    expect(linked[2]).toBe(before[2]);
    const row = await BandSetRow.create({ coachId: coach.id, setKey: "bike:power", bands: [] });
    const added = await prints();
    expect(added[0]).not.toBe(linked[0]);
    expect(added[1]).not.toBe(linked[1]);
    expect(added[2]).toBe(linked[2]);
    await new Promise((r) => setTimeout(r, 5));
    row.changed("bands", true);
    await row.update({ bands: [{ name: "x" }] });
    const edited = await prints();
    expect(edited[0]).not.toBe(added[0]);
    expect(edited[1]).not.toBe(added[1]);
    expect(edited[2]).toBe(added[2]);
  });

  it("keeps a removed session as CANCELLED for the grace days only, and leaves out other athletes' sessions", async () => {
    const { athlete } = await athleteWithFeed();
    const other = (await athleteWithFeed()).athlete;
    const day = todayIn(athlete.timezone);
    const base = {
      athleteId: athlete.id,
      date: day,
      sport: "bike",
      plannedDurationS: 3600,
      status: "cancelled",
    } as const;
    await ScheduledSession.create({
      ...base,
      name: "Dropped lately",
      cancelledAt: new Date(Date.now() - 2 * 86_400_000),
    } as never);
    await ScheduledSession.create({
      ...base,
      name: "Dropped long ago",
      cancelledAt: new Date(Date.now() - (feedCalendar.CANCELLED_GRACE_DAYS + 2) * 86_400_000),
    } as never);
    await ScheduledSession.create({
      athleteId: other.id,
      date: day,
      name: "Someone else's ride",
      sport: "bike",
      plannedDurationS: 3600,
    } as never);
    const { body, count } = await feedCalendar.buildFeed((await User.findByPk(athlete.id))!);
    expect(count).toBe(2);
    expect(body).toContain("Easy spin");
    const dropped = body.split("BEGIN:VEVENT").find((e) => e.includes("SUMMARY:Dropped lately"));
    expect(dropped).toContain("STATUS:CANCELLED");
    expect(body).not.toContain("Dropped long ago");
    expect(body).not.toContain("Someone else");
  });

  it("keeps the cache within its byte budget, dropping the least recently used feeds", () => {
    const cache = globalThis.__pacewrightFeedCache!;
    expect(cache.maxSize).toBe(64 * 1024 * 1024);
    const body = "x".repeat(4 * 1024 * 1024);
    for (let id = 1_000_000; id < 1_000_020; id++)
      cache.set(id, { fingerprint: String(id), body, lastModified: new Date() });
    expect(cache.calculatedSize).toBeLessThanOrEqual(cache.maxSize);
    expect(cache.has(1_000_000)).toBe(false);
    expect(cache.has(1_000_019)).toBe(true);
  });
});
