import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freePort, startApp, type RunningApp } from "./harness";

/**
 * Two app servers (scripts/start.ts, as `npm start` runs them) on one PostgreSQL database: concurrent board moves
 * and retests split across both, e-mail queued for both senders, and the daily reminder job running in both.
 * Runs when TEST_DATABASE_URL names a PostgreSQL server (`bash scripts/with-postgres.sh npx vitest run --project
 * e2e tests/e2e/two-instances.test.ts`); the SQLite build has one process per file and skips it.
 */
const adminUrl = process.env.TEST_DATABASE_URL?.trim() || "";
const dbName = `pw_two_${process.pid}`;
const READY = { answers: ["no", "no", "no", "no", "no"], stopSignsRead: true };
const PASSWORD = "two-instances-password";
const WEBHOOK_SECRET = "whsec_two_instances";

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

/** SIGKILL for a process and everything under it: tsx runs the server in a child of the process we spawned. */
function killTree(pid: number) {
  const children = (p: number): number[] =>
    fs.readdirSync(`/proc/${p}/task`).flatMap((t) => {
      try {
        return fs.readFileSync(`/proc/${p}/task/${t}/children`, "utf8").split(" ").filter(Boolean).map(Number);
      } catch {
        return [];
      }
    });
  const all: number[] = [];
  const walk = (p: number) => {
    all.push(p);
    for (const c of children(p)) walk(c);
  };
  walk(pid);
  for (const p of all.reverse()) {
    try {
      process.kill(p, "SIGKILL");
    } catch {
      /* already gone */
    }
  }
}

async function signIn(app: RunningApp, email: string) {
  const res = await fetch(`${app.baseUrl}/login`, {
    method: "POST",
    redirect: "manual",
    body: new URLSearchParams({ email, password: PASSWORD }),
    headers: { "Content-Type": "application/x-www-form-urlencoded", Origin: app.baseUrl },
  });
  expect(res.status).toBe(302);
  return res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .join("; ");
}

describe.runIf(adminUrl !== "")("two instances on one PostgreSQL", () => {
  let dir = "";
  let apps: RunningApp[] = [];
  let closeCatcher: (() => Promise<void>) | null = null;
  const ctx = {} as {
    coachEmail: string;
    athleteEmail: string;
    remindedEmail: string;
    athleteId: number;
    remindedId: number;
    planId: number;
    itemIds: number[];
    weekIds: number[];
    today: string;
  };

  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-two-"));
    await admin(`CREATE DATABASE ${dbName} TEMPLATE template0 ENCODING 'UTF8'`);
    const url = new URL(adminUrl);
    url.pathname = `/${dbName}`;
    Object.assign(process.env, {
      DATABASE_URL: url.toString(),
      MIGRATE_QUIET: "1",
      NODE_ENV: "test",
      UPLOAD_DIR: path.join(dir, "uploads"),
      PACEWRIGHT_FAKES: "on",
    });
    const { migrator } = await import("../../db/migrator");
    await migrator().up();

    const { hashPassword } = await import("~/.server/auth");
    const { CoachAthlete, PlanItem, PlanWeek, ScheduledSession, ShelfSession, ShelfBlock, Threshold, User } =
      await import("~/.server/models");
    const { createPlan } = await import("~/.server/services/plans");
    const { applyBoardOp } = await import("~/.server/services/board");
    const { assignPlan } = await import("~/.server/services/materialize");
    const { addDays, mondayOf, todayIn } = await import("~/lib/dates");
    const passwordHash = await hashPassword(PASSWORD);
    const mk = (role: "coach" | "athlete", email: string) =>
      User.create({ role, email, name: `${role} ${email.split("@")[0]}`, passwordHash, timezone: "UTC" });
    const coach = await mk("coach", "coach.two@example.test");
    const athlete = await mk("athlete", "athlete.two@example.test");
    const reminded = await mk("athlete", "reminded.two@example.test");
    await CoachAthlete.bulkCreate([
      { coachId: coach.id, athleteId: athlete.id },
      { coachId: coach.id, athleteId: reminded.id },
    ]);
    await Threshold.create({
      athleteId: athlete.id,
      sport: "bike",
      metric: "power",
      value: 250,
      unit: "W",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });
    const s = await ShelfSession.create({ ownerId: coach.id, name: "Threshold", sport: "bike" });
    await ShelfBlock.bulkCreate([
      {
        sessionId: s.id,
        position: 0,
        kind: "steady",
        spec: { kind: "steady", durationS: 600, target: { metric: "power", lowPct: 55, highPct: 65 } },
      },
      {
        sessionId: s.id,
        position: 1,
        kind: "steady",
        spec: { kind: "steady", durationS: 1200, target: { metric: "power", lowPct: 97.5, highPct: 103 } },
      },
    ]);
    const today = todayIn("UTC");
    const plan = await createPlan(coach.id, {
      name: "Two instances",
      sport: "bike",
      description: "",
      alignment: "start",
      date: mondayOf(today),
      weeks: 6,
      weeklyHours: 8,
      pattern: "3:1",
      testEveryWeeks: 6,
    });
    await PlanItem.destroy({ where: { planId: plan.id } });
    const weeks = await PlanWeek.findAll({ where: { planId: plan.id }, order: [["idx", "ASC"]] });
    for (let i = 0; i < 12; i++)
      await applyBoardOp(coach.id, plan.id, {
        op: "copy",
        sessionId: s.id,
        toWeek: weeks[i % weeks.length].id,
        toDay: i % 7,
        toIndex: 0,
      });
    await assignPlan(coach, plan.id, [athlete.id], { mode: "start", date: mondayOf(today) });
    // A planned field test two days ahead: the daily job (run by both instances at start) reminds once.
    await ScheduledSession.create({
      athleteId: reminded.id,
      date: addDays(today, 2),
      name: "20-minute field test",
      sport: "bike",
      testProtocol: "twenty_minute",
    });
    Object.assign(ctx, {
      coachEmail: coach.email,
      athleteEmail: athlete.email,
      remindedEmail: reminded.email,
      athleteId: athlete.id,
      remindedId: reminded.id,
      planId: plan.id,
      itemIds: (await PlanItem.findAll({ where: { planId: plan.id } })).map((i) => i.id),
      weekIds: weeks.map((w) => w.id),
      today,
    });

    // One mail catcher for both instances, in this process: what it receives is what left the outbox.
    const { startMailCatcher } = await import("~/.server/fakes/mail-catcher");
    const smtpPort = await freePort();
    closeCatcher = (await startMailCatcher(smtpPort)).close;
    const shared = {
      DATABASE_URL: url.toString(),
      SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
      PACEWRIGHT_FAKES: "off",
      PACEWRIGHT_MIGRATE: "off",
      PACEWRIGHT_SEED: "off",
      SESSION_SECRET: "two-instances-session-secret-0123456789abcdef",
      DATABASE_POOL_MAX: "5",
      // Only webhook signatures are checked with these; no call goes to a provider.
      STRIPE_SECRET_KEY: "sk_test_two_instances",
      STRIPE_WEBHOOK_SECRET: WEBHOOK_SECRET,
    };
    // One after the other: the first rebuilds a stale build, which the second must not race.
    apps = [await startApp(shared)];
    apps.push(await startApp(shared));
  }, 300_000);

  afterAll(async () => {
    await Promise.all(apps.map((a) => a.stop()));
    await closeCatcher?.();
    const { closeDb } = await import("~/.server/db");
    await closeDb();
    await admin(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`);
    if (dir) fs.rmSync(dir, { recursive: true, force: true });
  }, 60_000);

  it("40 concurrent board moves across both: every item once, every day slot numbered 0…n−1", async () => {
    const cookies = await Promise.all(apps.map((a) => signIn(a, ctx.coachEmail)));
    const { PlanItem, SeasonPlan } = await import("~/.server/models");
    const versionBefore = (await SeasonPlan.findByPk(ctx.planId))!.version;
    const moves = Array.from({ length: 40 }, (_, k) =>
      fetch(`${apps[k % 2].baseUrl}/api/plans/${ctx.planId}/items`, {
        method: "POST",
        body: JSON.stringify({
          op: "move",
          itemId: ctx.itemIds[k % ctx.itemIds.length],
          toWeek: ctx.weekIds[k % 3],
          toDay: k % 7,
          toIndex: k % 4,
        }),
        headers: { "Content-Type": "application/json", Cookie: cookies[k % 2], Origin: apps[k % 2].baseUrl },
      }).then((r) => r.status),
    );
    expect(await Promise.all(moves)).toEqual(Array(40).fill(200));
    const after = await PlanItem.findAll({ where: { planId: ctx.planId } });
    expect(after.map((i) => i.id).sort((a, b) => a - b)).toEqual([...ctx.itemIds].sort((a, b) => a - b));
    const slots = new Map<string, number[]>();
    for (const i of after)
      slots.set(`${i.weekId}:${i.day}`, [...(slots.get(`${i.weekId}:${i.day}`) ?? []), i.position]);
    for (const positions of slots.values()) expect(positions.sort((a, b) => a - b)).toEqual(positions.map((_, k) => k));
    // Each move bumped the version exactly once: none was lost to a concurrent one.
    expect((await SeasonPlan.findByPk(ctx.planId))!.version).toBe(versionBefore + 40);
  });

  it("20 retests for one athlete across both: 20 tests, and every future target on the newest threshold", async () => {
    const { addDays } = await import("~/lib/dates");
    const cookies = await Promise.all(apps.map((a) => signIn(a, ctx.athleteEmail)));
    const saves = Array.from({ length: 20 }, (_, k) =>
      fetch(`${apps[k % 2].baseUrl}/athlete/tests/new`, {
        method: "POST",
        redirect: "manual",
        body: JSON.stringify({
          protocol: "twenty_minute",
          inputs: { meanW: String(270 + k) },
          testedOn: addDays(ctx.today, -(k + 1)),
          readiness: READY,
          confirmed: true,
          requestKey: `two-instances-${k}`,
        }),
        headers: { "Content-Type": "application/json", Cookie: cookies[k % 2], Origin: apps[k % 2].baseUrl },
      }).then(async (r) => (r.status === 302 ? 302 : `${r.status} ${await r.text()}`)),
    );
    expect(await Promise.all(saves)).toEqual(Array(20).fill(302));
    const { FieldTest, ScheduledBlock, ScheduledSession, Threshold } = await import("~/.server/models");
    const { resolveTarget } = await import("~/lib/training");
    expect(await FieldTest.count({ where: { athleteId: ctx.athleteId } })).toBe(20);
    const newest = (await Threshold.findOne({
      where: { athleteId: ctx.athleteId, sport: "bike", metric: "power" },
      order: [
        ["effectiveFrom", "DESC"],
        ["id", "DESC"],
      ],
    }))!;
    expect(newest.effectiveFrom).toBe(addDays(ctx.today, -1));
    const planned = (await ScheduledSession.findAll({ where: { athleteId: ctx.athleteId, status: "planned" } }))
      .filter((s) => s.date >= newest.effectiveFrom)
      .map((s) => s.id);
    expect(planned.length).toBeGreaterThan(0);
    const blocks = await ScheduledBlock.findAll({ where: { scheduledSessionId: planned } });
    const wrong = blocks.filter((b) => {
      const t = resolveTarget({ metric: "power", lowPct: b.lowPct!, highPct: b.highPct! }, newest.value);
      return b.thresholdId !== newest.id || b.lowAbs !== t.low || b.highAbs !== t.high;
    });
    expect(wrong.map((b) => `${b.date} ${b.lowPct}%: ${b.lowAbs} (threshold ${b.thresholdValue})`)).toEqual([]);
  });

  it("30 queued e-mails, the test summaries and the reminder: each delivered exactly once", async () => {
    const { queueEmail } = await import("~/.server/mail");
    const { OutboundEmail } = await import("~/.server/models");
    const { mailbox } = await import("~/.server/fakes/mailbox");
    for (let k = 0; k < 30; k++) {
      await queueEmail({
        to: `queued.${k}@example.test`,
        template: "invitation",
        vars: { coachName: "Coach Two", athleteName: `Runner ${k}`, link: "http://localhost/x" },
      });
    }
    const deadline = Date.now() + 90_000;
    while ((await OutboundEmail.count({ where: { status: "pending" } })) > 0 && Date.now() < deadline)
      await new Promise((r) => setTimeout(r, 250));
    expect(await OutboundEmail.count({ where: { status: "pending" } })).toBe(0);
    const rows = await OutboundEmail.findAll();
    expect(rows.every((r) => r.status === "sent")).toBe(true);
    // Let any straggling SMTP conversation land before counting.
    await new Promise((r) => setTimeout(r, 500));
    const received = mailbox()
      .messages.map((m) => `${m.to.join(",")}|${m.subject}`)
      .sort();
    const sent = rows.map((r) => `${r.toAddress}|${r.subject}`).sort();
    expect(received).toEqual(sent);
    expect(rows.filter((r) => r.toAddress.startsWith("queued."))).toHaveLength(30);
    expect(rows.filter((r) => r.toAddress === ctx.remindedEmail && r.template === "retest-reminder")).toHaveLength(1);
    const { db } = await import("~/.server/db");
    const [{ n }] = await db().query<{ n: number }>("SELECT COUNT(*) AS n FROM retest_reminders WHERE athlete_id = ?", {
      replacements: [ctx.remindedId],
      type: "SELECT" as never,
    });
    expect(Number(n)).toBe(1);
  }, 120_000);

  it("payment webhooks split across both, each sent twice and reported twice: every order placed exactly once", async () => {
    const { default: Stripe } = await import("stripe");
    const { createPlan } = await import("~/.server/services/plans");
    const { Assignment, Job, Listing, Order, OutboundEmail, User } = await import("~/.server/models");
    const { addDays, todayIn } = await import("~/lib/dates");
    const coach = (await User.findOne({ where: { email: ctx.coachEmail } }))!;
    const plan = await createPlan(coach.id, {
      name: "For sale",
      sport: "bike",
      description: "",
      alignment: "start",
      date: "2027-01-04",
      weeks: 4,
      weeklyHours: 6,
      pattern: "3:1",
      testEveryWeeks: 6,
    });
    const listing = await Listing.create({
      planId: plan.id,
      coachId: coach.id,
      slug: `two-instances-sale-${Date.now()}`,
      title: "For sale",
      description: "Four weeks.",
      sport: "bike",
      level: "intermediate",
      weeks: 4,
      weeklyHours: 6,
      priceCents: 2500,
      currency: "EUR",
      published: true,
    });
    const orders = [];
    for (let k = 0; k < 12; k++) {
      const buyer = await User.create({
        role: "athlete",
        email: `buyer.${k}@example.test`,
        name: `Buyer ${k}`,
        passwordHash: "x",
        timezone: "UTC",
      });
      orders.push(
        await Order.create({
          listingId: listing.id,
          buyerId: buyer.id,
          amountCents: 2500,
          currency: "EUR",
          alignMode: "start",
          alignDate: addDays(todayIn("UTC"), 7),
          checkoutSessionId: `cs_two_${k}`,
        }),
      );
    }
    const signer = new Stripe("sk_test_signer", { telemetry: false });
    const send = (app: RunningApp, event: object) => {
      const payload = JSON.stringify(event);
      return fetch(`${app.baseUrl}/webhooks/payments`, {
        method: "POST",
        body: payload,
        headers: {
          "Content-Type": "application/json",
          "stripe-signature": signer.webhooks.generateTestHeaderString({ payload, secret: WEBHOOK_SECRET }),
        },
      }).then((r) => r.status);
    };
    const created = Math.floor(Date.now() / 1000);
    // Per order: the checkout's completion to one instance and its redelivery to the other, and the payment's own
    // event (same payment, another event id) to the other as well, all at once.
    const deliveries = orders.flatMap((o, k) => {
      const meta = { orderId: String(o.id) };
      const pi = `pi_two_${k}`;
      const completed = {
        id: `evt_two_${k}_completed`,
        type: "checkout.session.completed",
        created,
        data: {
          object: {
            id: o.checkoutSessionId,
            object: "checkout.session",
            amount_total: 2500,
            currency: "eur",
            metadata: meta,
            payment_intent: pi,
            payment_status: "paid",
          },
        },
      };
      const succeeded = {
        id: `evt_two_${k}_succeeded`,
        type: "payment_intent.succeeded",
        created,
        data: {
          object: {
            id: pi,
            object: "payment_intent",
            amount: 2500,
            amount_received: 2500,
            currency: "eur",
            metadata: meta,
          },
        },
      };
      return [send(apps[k % 2], completed), send(apps[(k + 1) % 2], completed), send(apps[(k + 1) % 2], succeeded)];
    });
    expect(await Promise.all(deliveries)).toEqual(Array(deliveries.length).fill(200));
    const ids = orders.map((o) => o.id);
    const deadline = Date.now() + 60_000;
    while ((await Job.count({ where: { orderId: ids, status: "pending" } })) > 0 && Date.now() < deadline)
      await new Promise((r) => setTimeout(r, 200));
    const jobs = await Job.findAll({ where: { orderId: ids } });
    expect(jobs.map((j) => `${j.kind}:${j.status}`)).toEqual(Array(orders.length).fill("place:done"));
    for (const o of orders) {
      await o.reload();
      expect(o.status).toBe("fulfilled");
      expect(await Assignment.count({ where: { athleteId: o.buyerId } })).toBe(1);
      const buyer = (await User.findByPk(o.buyerId))!;
      expect(await OutboundEmail.count({ where: { toAddress: buyer.email, template: "receipt" } })).toBe(1);
    }
  }, 120_000);

  // No retry: the killed instance stays dead.
  it("one instance killed mid-write: the other goes on and the board stays consistent", { retry: 0 }, async () => {
    const cookies = await Promise.all(apps.map((a) => signIn(a, ctx.coachEmail)));
    const { PlanItem } = await import("~/.server/models");
    const move = (k: number, app: number) =>
      fetch(`${apps[app].baseUrl}/api/plans/${ctx.planId}/items`, {
        method: "POST",
        body: JSON.stringify({
          op: "move",
          itemId: ctx.itemIds[k % ctx.itemIds.length],
          toWeek: ctx.weekIds[(k + 1) % 3],
          toDay: (k * 3) % 7,
          toIndex: k % 3,
        }),
        headers: { "Content-Type": "application/json", Cookie: cookies[app], Origin: apps[app].baseUrl },
      }).then(
        (r) => r.status,
        () => "dropped" as const,
      );
    // SIGKILL as soon as the instance has answered its first move, with the rest of its moves still open: their
    // transactions die with their connections and roll back.
    let killed = false;
    const inFlight = Array.from({ length: 40 }, (_, k) =>
      move(k, k % 2).then((status) => {
        if (k % 2 === 1 && status === 200 && !killed) {
          killed = true;
          killTree(apps[1].child.pid!);
        }
        return status;
      }),
    );
    const statuses = await Promise.all(inFlight);
    // The killed instance really had requests open (they come back dropped, not answered).
    expect(statuses.filter((_, k) => k % 2 === 1)).toContain("dropped");
    expect(killed).toBe(true);
    expect(statuses.filter((_, k) => k % 2 === 0)).toEqual(Array(20).fill(200));
    // The survivor keeps serving writes after the crash.
    expect(await Promise.all(Array.from({ length: 10 }, (_, k) => move(k + 30, 0)))).toEqual(Array(10).fill(200));
    const after = await PlanItem.findAll({ where: { planId: ctx.planId } });
    expect(after.map((i) => i.id).sort((a, b) => a - b)).toEqual([...ctx.itemIds].sort((a, b) => a - b));
    const slots = new Map<string, number[]>();
    for (const i of after)
      slots.set(`${i.weekId}:${i.day}`, [...(slots.get(`${i.weekId}:${i.day}`) ?? []), i.position]);
    for (const positions of slots.values()) expect(positions.sort((a, b) => a - b)).toEqual(positions.map((_, k) => k));
    const health = await fetch(`${apps[0].baseUrl}/healthz`);
    expect(health.status).toBe(200);
  });
});
