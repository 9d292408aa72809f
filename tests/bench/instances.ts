/**
 * Signed-in page requests per second: one app instance against two (scripts/start.ts, production build, one
 * PostgreSQL database), the same load generator and the same number of open connections in both cases, split
 * round-robin over the instances when there are two. Runs interleaved (one, two, one, two …), median of three.
 * Also reports where the CPU went during each run (each instance, the load generator, PostgreSQL, and every other
 * process on the machine), because on a small machine they all share the same cores: two instances can only serve
 * more than one if a core is left over while one instance runs.
 * Run: `npm run bench:instances` (builds, starts a throwaway PostgreSQL cluster). A report, never a gate.
 */
import fs from "node:fs";
import os from "node:os";
import autocannon from "autocannon";
import { startApp, type RunningApp } from "../e2e/harness";

const ROUNDS = 3;
const SECONDS = Number(process.env.BENCH_SECONDS ?? 8);
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 16);
const PAGE = "/coach";
const PASSWORD = "bench-instances-password";
const adminUrl = process.env.TEST_DATABASE_URL?.trim() || "";
const dbName = `pw_bench_inst_${process.pid}`;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const TICK = 100; // USER_HZ on Linux

async function admin(sql: string) {
  const { default: pg } = await import("pg");
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}

/** CPU seconds used so far by a process and everything under it (tsx runs the server in a child process). */
function treeCpu(pid: number): number {
  let total = 0;
  const walk = (p: number) => {
    try {
      const stat = fs.readFileSync(`/proc/${p}/stat`, "utf8");
      const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
      total += (Number(f[11]) + Number(f[12])) / TICK; // utime, stime
      for (const t of fs.readdirSync(`/proc/${p}/task`)) {
        for (const c of fs.readFileSync(`/proc/${p}/task/${t}/children`, "utf8").split(" ").filter(Boolean))
          walk(Number(c));
      }
    } catch {
      /* gone */
    }
  };
  walk(pid);
  return total;
}

/** Busy CPU seconds of the whole machine (all cores), from /proc/stat. */
function machineCpu(): number {
  const f = fs.readFileSync("/proc/stat", "utf8").split("\n")[0].trim().split(/\s+/).slice(1).map(Number);
  const idle = f[3] + f[4];
  return (f.reduce((a, b) => a + b, 0) - idle) / TICK;
}

async function signIn(app: RunningApp, email: string) {
  const res = await fetch(`${app.baseUrl}/login`, {
    method: "POST",
    redirect: "manual",
    body: new URLSearchParams({ email, password: PASSWORD }),
    headers: { "Content-Type": "application/x-www-form-urlencoded", Origin: app.baseUrl },
  });
  if (res.status !== 302) throw new Error(`sign-in failed: ${res.status}`);
  return res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .join("; ");
}

const cannon = (url: string, cookie: string, connections: number) =>
  new Promise<autocannon.Result>((resolve, reject) =>
    autocannon({ url, connections, duration: SECONDS, headers: { cookie } }, (err, r) =>
      err ? reject(err) : resolve(r),
    ),
  );

/** The PostgreSQL server's main process (its first line of postmaster.pid), found from the socket folder. */
function postmasterPid(): number | null {
  const host = new URL(adminUrl).searchParams.get("host");
  try {
    return host ? Number(fs.readFileSync(`${host}/data/postmaster.pid`, "utf8").split("\n")[0]) : null;
  } catch {
    return null;
  }
}

async function measure(targets: { app: RunningApp; cookie: string }[], all: RunningApp[]) {
  const pgPid = postmasterPid();
  const pgCpu = () => (pgPid ? treeCpu(pgPid) : 0);
  const before = {
    apps: all.map((a) => treeCpu(a.child.pid!)),
    pg: pgCpu(),
    self: process.cpuUsage(),
    machine: machineCpu(),
    at: performance.now(),
  };
  // Round-robin at connection level: each instance gets an equal share of the same total of open connections.
  const results = await Promise.all(
    targets.map((t) => cannon(`${t.app.baseUrl}${PAGE}`, t.cookie, CONNECTIONS / targets.length)),
  );
  const wall = (performance.now() - before.at) / 1000;
  const self = process.cpuUsage(before.self);
  const apps = all.map((a, i) => (treeCpu(a.child.pid!) - before.apps[i]) / wall);
  const generator = (self.user + self.system) / 1e6 / wall;
  const machine = (machineCpu() - before.machine) / wall;
  const postgres = (pgCpu() - before.pg) / wall;
  const ok = results.reduce((n, r) => n + r.requests.total - r.non2xx - r.errors, 0);
  const bad = results.reduce((n, r) => n + r.non2xx + r.errors, 0);
  return {
    rps: ok / wall,
    bad,
    apps,
    generator,
    postgres,
    rest: machine - apps.reduce((a, b) => a + b, 0) - generator - postgres,
    machine,
    load: os.loadavg()[0],
  };
}

async function main() {
  if (!adminUrl) throw new Error("Needs PostgreSQL: run `npm run bench:instances` (it starts a throwaway cluster).");
  await admin(`CREATE DATABASE ${dbName} TEMPLATE template0 ENCODING 'UTF8'`);
  const url = new URL(adminUrl);
  url.pathname = `/${dbName}`;
  Object.assign(process.env, { DATABASE_URL: url.toString(), MIGRATE_QUIET: "1", NODE_ENV: "test" });
  const apps: RunningApp[] = [];
  try {
    const { migrator } = await import("../../db/migrator");
    await migrator().up();
    const { hashPassword } = await import("~/.server/auth");
    const { CoachAthlete, User } = await import("~/.server/models");
    const passwordHash = await hashPassword(PASSWORD);
    const coach = await User.create({
      role: "coach",
      email: "bench.coach@example.test",
      name: "Bench Coach",
      passwordHash,
      timezone: "UTC",
    });
    for (let k = 0; k < 12; k++) {
      const a = await User.create({
        role: "athlete",
        email: `bench.athlete.${k}@example.test`,
        name: `Athlete ${k}`,
        passwordHash,
        timezone: "UTC",
      });
      await CoachAthlete.create({ coachId: coach.id, athleteId: a.id });
    }
    const { closeDb } = await import("~/.server/db");
    await closeDb();
    const shared = {
      DATABASE_URL: url.toString(),
      PACEWRIGHT_FAKES: "off",
      PACEWRIGHT_MIGRATE: "off",
      PACEWRIGHT_SEED: "off",
      SESSION_SECRET: "bench-instances-session-secret-0123456789abcdef",
    };
    apps.push(await startApp(shared));
    apps.push(await startApp(shared));
    const cookies = await Promise.all(apps.map((a) => signIn(a, coach.email)));
    const page = await fetch(`${apps[0].baseUrl}${PAGE}`, { headers: { cookie: cookies[0] } });
    if (page.status !== 200 || !(await page.text()).includes("Athlete 11"))
      throw new Error(`${PAGE} did not show the roster (${page.status})`);
    const one = [{ app: apps[0], cookie: cookies[0] }];
    const two = apps.map((app, i) => ({ app, cookie: cookies[i] }));
    // Warm both (JIT, connection pools, route modules) before anything counts.
    await Promise.all(two.map((t) => cannon(`${t.app.baseUrl}${PAGE}`, t.cookie, 4)));
    const runs: { one: Awaited<ReturnType<typeof measure>>[]; two: Awaited<ReturnType<typeof measure>>[] } = {
      one: [],
      two: [],
    };
    for (let r = 0; r < ROUNDS; r++) {
      // Alternate which goes first, so a drift in the machine's load does not favour one side.
      for (const side of r % 2 ? (["two", "one"] as const) : (["one", "two"] as const)) {
        const m = await measure(side === "one" ? one : two, apps);
        runs[side].push(m);
        console.log(
          `  round ${r + 1} ${side === "one" ? "one instance " : "two instances"}: ${m.rps.toFixed(0)} req/s${m.bad ? ` (${m.bad} not 2xx)` : ""} · CPU cores busy: instance A ${m.apps[0].toFixed(2)}, instance B ${m.apps[1].toFixed(2)}, load generator ${m.generator.toFixed(2)}, PostgreSQL ${m.postgres.toFixed(2)}, other processes ${m.rest.toFixed(2)}, machine ${m.machine.toFixed(2)} of ${os.cpus().length}, load average ${m.load.toFixed(1)}`,
        );
      }
    }
    const oneRps = median(runs.one.map((m) => m.rps));
    const twoRps = median(runs.two.map((m) => m.rps));
    const cpu = (ms: typeof runs.one, f: (m: (typeof ms)[number]) => number) => median(ms.map(f)).toFixed(2);
    console.log(
      `\nSigned-in ${PAGE} page, ${CONNECTIONS} connections, ${SECONDS} s per run, median of ${ROUNDS}, interleaved:`,
    );
    console.log(
      `  one instance : ${oneRps.toFixed(0)} req/s (instance ${cpu(runs.one, (m) => m.apps[0])} cores, load generator ${cpu(runs.one, (m) => m.generator)}, PostgreSQL ${cpu(runs.one, (m) => m.postgres)}, other processes ${cpu(runs.one, (m) => m.rest)}, machine ${cpu(runs.one, (m) => m.machine)} of ${os.cpus().length})`,
    );
    console.log(
      `  two instances: ${twoRps.toFixed(0)} req/s (instances ${cpu(runs.two, (m) => m.apps[0] + m.apps[1])} cores, load generator ${cpu(runs.two, (m) => m.generator)}, PostgreSQL ${cpu(runs.two, (m) => m.postgres)}, other processes ${cpu(runs.two, (m) => m.rest)}, machine ${cpu(runs.two, (m) => m.machine)} of ${os.cpus().length})`,
    );
    console.log(
      `  two / one    : ${(twoRps / oneRps).toFixed(2)}× (aim ≥ 1.6×; a report, not a gate — timings on a shared machine are noisy)`,
    );
  } finally {
    await Promise.all(apps.map((a) => a.stop()));
    const { closeDb } = await import("~/.server/db");
    await closeDb();
    await admin(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`);
  }
}

main().then(
  () => process.exit(0),
  (err) => {
    console.error(err);
    process.exit(1);
  },
);
