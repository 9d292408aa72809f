import fs from "node:fs";
import http from "node:http";
import type { AddressInfo } from "node:net";
import { Readable } from "node:stream";
import v8 from "node:v8";
import vm from "node:vm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { ACTIVITY_LIMITS, activityThreads, readActivityOffThread } from "~/.server/services/activity-pool";
import { env } from "~/.server/env";
import { Upload } from "~/.server/models";
import * as healthz from "~/routes/healthz";
import * as uploads from "~/routes/api/uploads";
import { makeUser, run, signIn } from "../integration/helpers";

/**
 * The upload route and /healthz behind a real HTTP server in this process, so a slow parse on the request thread
 * would show up as slow health checks, the way it did for everyone using the server.
 */
let server: http.Server;
let base = "";

beforeAll(async () => {
  server = http.createServer(async (req, res) => {
    const url = new URL(req.url ?? "/", "http://localhost:3999");
    const headers = new Headers();
    for (const [k, v] of Object.entries(req.headers)) if (typeof v === "string") headers.set(k, v);
    const hasBody = req.method !== "GET" && req.method !== "HEAD";
    const request = new Request(url, {
      method: req.method,
      headers,
      body: hasBody ? (Readable.toWeb(req) as ReadableStream) : undefined,
      duplex: "half",
    } as RequestInit);
    const route =
      url.pathname === "/healthz" ? healthz.loader : req.method === "POST" ? uploads.action : uploads.loader;
    const out = (await run(route as (args: unknown) => Promise<Response>, request)) as Response;
    res.writeHead(out.status, Object.fromEntries(out.headers.entries()));
    res.end(Buffer.from(await out.arrayBuffer()));
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

/** Heap in use after a full collection (v8's gc hook, switched on for this file only). */
function heapAfterGc() {
  v8.setFlagsFromString("--expose-gc");
  const gc = vm.runInNewContext("gc") as () => void;
  gc();
  gc();
  return process.memoryUsage().heapUsed;
}

/** 16 MB of plausible rows, one a second: about 277 hours of riding. */
function hugeCsv(rows = 1_000_000) {
  const lines = ["time,power,heart_rate,cadence"];
  for (let i = 0; i < rows; i++) lines.push(`${i},${150 + (i % 120)},${120 + (i % 40)},${80 + (i % 15)}`);
  return lines.join("\n");
}

async function upload(cookie: string, name: string, body: string | Uint8Array) {
  const form = new FormData();
  form.append("file", new File([body as BlobPart], name, { type: "text/csv" }));
  return fetch(`${base}/api/uploads`, {
    method: "POST",
    body: form,
    headers: { Cookie: cookie, Origin: "http://localhost:3999" },
  });
}

/**
 * Polls /healthz every 20 ms until `work` settles. Each figure runs from when the poll was due to when its answer
 * arrived: the poller shares this process with the server, so a stalled event loop also delays the poll's start,
 * and that wait counts.
 */
async function pollWhile<T>(work: Promise<T>) {
  const times: number[] = [];
  let done = false;
  const finished = work.finally(() => (done = true));
  let due = performance.now();
  while (!done) {
    const res = await fetch(`${base}/healthz`);
    await res.text();
    const end = performance.now();
    times.push(end - due);
    due = end + 20;
    await new Promise((r) => setTimeout(r, 20));
  }
  return { result: await finished, times };
}

describe("uploads cannot stall the server", () => {
  it("answers /healthz within 250 ms on every poll while a 16 MB, 1,000,000-row CSV is uploaded, and stores nothing", async () => {
    const athlete = await makeUser({ role: "athlete" });
    const cookie = await signIn(athlete.email);
    const csv = hugeCsv();
    expect(csv.length).toBeGreaterThan(16_000_000);
    const before = await Upload.count();
    const { result, times } = await pollWhile(upload(cookie, "huge.csv", csv));
    expect(times.length).toBeGreaterThan(0);
    expect(Math.max(...times)).toBeLessThan(250);
    expect(result.status).toBe(413);
    const body = await result.json();
    expect(body.error).toMatch(/rows|hours/);
    expect(await Upload.count()).toBe(before);
    const dir = `${env().uploadDir}/${athlete.id}`;
    expect(fs.existsSync(dir) ? fs.readdirSync(dir) : []).toEqual([]);
  });

  it("still reads an ordinary long ride, off the request thread, and the trace comes back with it", async () => {
    const athlete = await makeUser({ role: "athlete" });
    const cookie = await signIn(athlete.email);
    const { result, times } = await pollWhile(upload(cookie, "six-hours.csv", hugeCsv(6 * 3600)));
    expect(Math.max(...times)).toBeLessThan(250);
    expect(result.status).toBe(201);
    const body = await result.json();
    expect(body.upload.summary.durationS).toBe(6 * 3600);
    expect(body.trace.length).toBeGreaterThan(1000);
    const again = await fetch(`${base}/api/uploads?id=${body.upload.id}`, { headers: { Cookie: cookie } });
    expect((await again.json()).trace.length).toBe(body.trace.length);
  });

  it("parses the heaviest file under the row limit on a worker: the server stays responsive and the memory is handed back", async () => {
    const athlete = await makeUser({ role: "athlete" });
    const cookie = await signIn(athlete.email);
    const heapBefore = heapAfterGc();
    // Under the row limit but wide: every row carries forty extra columns the parser still has to split. Built in
    // a closure so nothing of it is left on this side once the upload is over.
    const { result, times } = await (async () => {
      const extra = Array.from({ length: 40 }, (_, i) => `x${i}`).join(",");
      const lines = [`time,power,heart_rate,${extra}`];
      for (let i = 0; i < 150_000; i++) lines.push(`${i},${200 + (i % 50)},${130 + (i % 20)},${"123,".repeat(39)}123`);
      const csv = lines.join("\n");
      expect(csv.length).toBeGreaterThan(16_000_000);
      return pollWhile(upload(cookie, "wide.csv", csv));
    })();
    // This parse keeps a worker busy for seconds, so a loaded test machine (other test files, other work) shows up
    // in the polls: the bound is wider than the 250 ms of the test above, and still far under the seconds-long
    // stalls of a parse on the request thread.
    expect(Math.max(...times)).toBeLessThan(500);
    // The engine's own 24-hour rule answers this one, after a full parse on the worker.
    expect(result.status).toBe(400);
    expect((await result.json()).error).toMatch(/longer than 24 hours/);
    // Idle workers exit, returning what the parse took.
    await vi.waitFor(() => expect(activityThreads()).toBe(0), { timeout: 10_000, interval: 200 });
    // What the request thread kept: nothing of the file once the request is over.
    const kept = heapAfterGc() - heapBefore;
    expect(kept).toBeLessThan(20 * 1024 * 1024);
  });

  it("limits parses per person and time per parse, with a clear message", async () => {
    const bytes = new TextEncoder().encode(hugeCsv(20_000));
    const three = await Promise.allSettled(
      [1, 2, 3].map(() => readActivityOffThread({ bytes, name: "a.csv", want: "summary" }, 987654)),
    );
    expect(three.map((r) => r.status)).toEqual(["fulfilled", "fulfilled", "rejected"]);
    expect((three[2] as PromiseRejectedResult).reason).toMatchObject({
      kind: "rate_limited",
      message: expect.stringMatching(/already have 2 files being read/),
    });
    const saved = ACTIVITY_LIMITS.parseMs;
    ACTIVITY_LIMITS.parseMs = 1;
    try {
      await expect(readActivityOffThread({ bytes, name: "a.csv", want: "summary" }, 987654)).rejects.toMatchObject({
        kind: "unreadable",
        message: expect.stringMatching(/took longer than/),
      });
    } finally {
      ACTIVITY_LIMITS.parseMs = saved;
    }
    // A person's count is released after each parse, refused or not.
    await expect(readActivityOffThread({ bytes, name: "a.csv", want: "summary" }, 987654)).resolves.toMatchObject({
      ok: true,
    });
  });
});
