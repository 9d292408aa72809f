import http from "node:http";
import autocannon from "autocannon";
import { hashPassword } from "~/.server/auth";
import { db, sqlDate } from "~/.server/db";
import { User } from "~/.server/models";
import { rotateFeed } from "~/.server/services/feed";
import { addDays, todayIn } from "~/lib/dates";
import * as feed from "~/routes/feed";
import type { BenchFigure } from "./lib";

/**
 * A 500-event feed under a concurrent load generator, against a static response of the same size from the same
 * loopback server in the same run; and the 304 path with a matching ETag. Bounded: 4 s per measurement.
 */
export async function run(): Promise<BenchFigure[]> {
  const athlete = await User.create({ role: "athlete", email: "feed.bench@example.test", name: "Feed Bench", passwordHash: await hashPassword("bench-password-1"), timezone: "Europe/Berlin" });
  const today = todayIn(athlete.timezone);
  const now = sqlDate(new Date());
  for (let i = 0; i < 500; i++) {
    await db().query("INSERT INTO scheduled_sessions (athlete_id, date, time_of_day, name, sport, status, planned_duration_s, created_at, updated_at) VALUES (?, ?, ?, 'Bench session', 'bike', 'planned', 3600, ?, ?)", {
      replacements: [athlete.id, addDays(today, i - 50), i % 2 ? "07:00" : null, now, now],
    });
  }
  await db().query(
    `INSERT INTO scheduled_blocks (scheduled_session_id, athlete_id, date, sport, position, block_index, kind, part, duration_s, metric, low_pct, high_pct, ramp, low_abs, high_abs, unit)
     SELECT id, athlete_id, date, 'bike', 0, 0, 'steady', 'main', 3600, 'power', 70, 75, 0, 180, 195, 'W' FROM scheduled_sessions WHERE athlete_id = ?`,
    { replacements: [athlete.id] },
  );
  const token = await rotateFeed(athlete.id);
  const first = (await feed.loader({ request: new Request(`http://x/feed/${token}.ics`), params: { file: `${token}.ics` }, context: {} } as never)) as Response;
  const etag = first.headers.get("etag")!;
  const staticBody = await first.text();

  // The feed's per-token limit would turn most of the load into 429s; the bench measures the feed itself.
  const server = http.createServer(async (req, res) => {
    if (req.url === "/static") {
      res.writeHead(200, { "Content-Type": "text/calendar; charset=utf-8" }).end(staticBody);
      return;
    }
    await db().query("DELETE FROM rate_limits");
    // Every request builds the feed from the database, as the first fetch after any change does.
    if (req.url === "/feed") globalThis.__pacewrightFeedCache?.clear();
    req.url = "/feed";
    const r = (await feed.loader({ request: new Request(`http://x/feed/${token}.ics`, { headers: req.headers as Record<string, string> }), params: { file: `${token}.ics` }, context: {} } as never)) as Response;
    res.writeHead(r.status, Object.fromEntries(r.headers.entries())).end(Buffer.from(await r.arrayBuffer()));
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  const port = (server.address() as { port: number }).port;
  const load = (path: string, headers: Record<string, string> = {}) =>
    autocannon({ url: `http://127.0.0.1:${port}${path}`, connections: 8, duration: 4, headers }).then((r: autocannon.Result) => ({ rps: r.requests.average, p50: r.latency.p50, non2xx: r.non2xx }));
  const dynamic = await load("/feed");
  const fixed = await load("/static");
  const notModified = await load("/feed", { "If-None-Match": etag });
  const cached = await load("/feed-cached");
  server.closeAllConnections();
  await new Promise((r) => server.close(r));
  // Let the fire-and-forget "last used" writes finish before the database closes.
  await new Promise((r) => setTimeout(r, 300));
  return [
    { name: `500-event feed (${Math.round(staticBody.length / 1024)} KB): requests/s`, subjectMs: dynamic.p50, baselineMs: fixed.p50, baseline: "static response of the same size", ratio: Math.round((fixed.rps / Math.max(1, dynamic.rps)) * 10) / 10, note: `${Math.round(dynamic.rps)} vs ${Math.round(fixed.rps)} req/s; ms columns are median latency` },
    { name: "500-event feed, unchanged since the last build (cached)", subjectMs: cached.p50, baselineMs: fixed.p50, baseline: "static response of the same size", ratio: Math.round((fixed.rps / Math.max(1, cached.rps)) * 10) / 10, note: `${Math.round(cached.rps)} req/s` },
    { name: "feed 304 path (If-None-Match)", subjectMs: notModified.p50, baselineMs: dynamic.p50, baseline: "full 200 feed", ratio: Math.round((dynamic.rps > 0 ? notModified.rps / dynamic.rps : 0) * 10) / 10, note: `${Math.round(notModified.rps)} req/s; ratio is 304 throughput over 200 throughput` },
  ];
}
