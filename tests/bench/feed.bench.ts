import http from "node:http";
import autocannon from "autocannon";
import { hashPassword } from "~/.server/auth";
import { db, sqlDate } from "~/.server/db";
import { User } from "~/.server/models";
import { rotateFeed } from "~/.server/services/feed";
import { LIMITS } from "~/.server/security/rate-limits";
import { addDays, todayIn } from "~/lib/dates";
import * as feed from "~/routes/feed";
import type { BenchFigure } from "./lib";

/**
 * A 500-event feed under a concurrent load generator, against a static response of the same size from the same
 * loopback server in the same run; and the 304 path with a matching ETag. Bounded: 2 s per slice, three interleaved slices each.
 */
export async function run(): Promise<BenchFigure[]> {
  const athlete = await User.create({
    role: "athlete",
    email: "feed.bench@example.test",
    name: "Feed Bench",
    passwordHash: await hashPassword("bench-password-1"),
    timezone: "Europe/Berlin",
  });
  const today = todayIn(athlete.timezone);
  const now = sqlDate(new Date());
  for (let i = 0; i < 500; i++) {
    await db().query(
      "INSERT INTO scheduled_sessions (athlete_id, date, time_of_day, name, sport, status, planned_duration_s, created_at, updated_at) VALUES (?, ?, ?, 'Bench session', 'bike', 'planned', 3600, ?, ?)",
      {
        replacements: [athlete.id, addDays(today, i - 50), i % 2 ? "07:00" : null, now, now],
      },
    );
  }
  await db().query(
    `INSERT INTO scheduled_blocks (scheduled_session_id, athlete_id, date, sport, position, block_index, kind, part, duration_s, metric, low_pct, high_pct, ramp, low_abs, high_abs, unit)
     SELECT id, athlete_id, date, 'bike', 0, 0, 'steady', 'main', 3600, 'power', 70, 75, 0, 180, 195, 'W' FROM scheduled_sessions WHERE athlete_id = ?`,
    { replacements: [athlete.id] },
  );
  const token = await rotateFeed(athlete.id);
  const first = (await feed.loader({
    request: new Request(`http://x/feed/${token}.ics`),
    params: { file: `${token}.ics` },
    context: {},
  } as never)) as Response;
  const etag = first.headers.get("etag")!;
  const staticBody = await first.text();

  // The feed's per-token limit would turn most of the load into 429s; the bench measures the feed itself. The limit
  // is raised rather than emptied per request, so each request still pays the same counting as in production (one
  // upsert) and no extra write of the harness's own.
  (LIMITS.feedToken as { points: number }).points = 1e9;
  globalThis.__pacewrightLimiters?.delete("feedToken");
  const server = http.createServer(async (req, res) => {
    if (req.url === "/static") {
      res.writeHead(200, { "Content-Type": "text/calendar; charset=utf-8" }).end(staticBody);
      return;
    }
    // Every request builds the feed from the database, as the first fetch after any change does.
    if (req.url === "/feed") globalThis.__pacewrightFeedCache?.clear();
    req.url = "/feed";
    const r = (await feed.loader({
      request: new Request(`http://x/feed/${token}.ics`, { headers: req.headers as Record<string, string> }),
      params: { file: `${token}.ics` },
      context: {},
    } as never)) as Response;
    res.writeHead(r.status, Object.fromEntries(r.headers.entries())).end(Buffer.from(await r.arrayBuffer()));
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  const port = (server.address() as { port: number }).port;
  const load = (path: string, headers: Record<string, string> = {}, duration = 2) =>
    autocannon({ url: `http://127.0.0.1:${port}${path}`, connections: 8, duration, headers }).then(
      (r: autocannon.Result) => ({ rps: r.requests.average, p50: r.latency.p50, non2xx: r.non2xx }),
    );
  // Interleaved in short slices, so load from elsewhere on the machine hits all three alike.
  const slices = {
    dynamic: [] as number[],
    fixed: [] as number[],
    cached: [] as number[],
    notModified: [] as number[],
  };
  await load("/feed-cached", {}, 1); // warm the cache: the "cached" figure is about a feed already built
  for (let i = 0; i < 3; i++) {
    slices.dynamic.push((await load("/feed")).rps);
    slices.fixed.push((await load("/static")).rps);
    slices.cached.push((await load("/feed-cached")).rps);
    slices.notModified.push((await load("/feed", { "If-None-Match": etag })).rps);
  }
  const med = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
  const dynamic = med(slices.dynamic);
  const fixed = med(slices.fixed);
  const cached = med(slices.cached);
  const notModified = med(slices.notModified);
  server.closeAllConnections();
  await new Promise((r) => server.close(r));
  // Let the fire-and-forget "last used" writes finish before the database closes.
  await new Promise((r) => setTimeout(r, 300));
  const r1 = (x: number) => Math.round(x * 100) / 100;
  const kb = Math.round(staticBody.length / 1024);
  // Throughput figures: ratio = feed requests/s ÷ static requests/s, higher is better; ms columns are ms per request.
  return [
    {
      name: `500-event feed (${kb} KB), full rebuild: requests/s`,
      subjectMs: r1(1000 / dynamic),
      baselineMs: r1(1000 / fixed),
      baseline: "static response of the same body",
      ratio: r1(dynamic / fixed),
      aim: 0.1,
      higherIsBetter: true,
      note: `${Math.round(dynamic)} vs ${Math.round(fixed)} req/s, 8 connections; neither side is compressed (no Accept-Encoding, and the loader runs without the server's compression middleware)`,
    },
    {
      name: "500-event feed, unchanged since the last build (warm cache)",
      subjectMs: r1(1000 / cached),
      baselineMs: r1(1000 / fixed),
      baseline: "static response of the same body",
      ratio: r1(cached / fixed),
      aim: 0.8,
      higherIsBetter: true,
      note: `${Math.round(cached)} req/s; every feed request also pays its per-token limit upsert (a database write), which the static side does not`,
    },
    {
      name: "feed 304 path (If-None-Match)",
      subjectMs: r1(1000 / notModified),
      baselineMs: r1(1000 / fixed),
      baseline: "static response of the same body",
      ratio: r1(notModified / fixed),
      higherIsBetter: true,
      note: `${Math.round(notModified)} req/s; a 304 has no body, so above 1 is expected`,
    },
  ];
}
