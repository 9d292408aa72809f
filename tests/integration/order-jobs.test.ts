import type { Transaction } from "sequelize";
import { describe, expect, it } from "vitest";
import { dialect } from "~/.server/db";
import { JOB_MAX_ATTEMPTS, jobBackoffMs, runDueJobs } from "~/.server/jobs";
import {
  Assignment,
  Job,
  Listing,
  Order,
  OutboundEmail,
  PlanWeek,
  ScheduledSession,
  ShelfSession,
  ShelfBlock,
  Threshold,
} from "~/.server/models";
import { applyBoardOp } from "~/.server/services/board";
import { ORDER_FOLLOW_UPS, runOrderFollowUps } from "~/.server/services/order-follow-ups";
import { resolveReview } from "~/.server/services/order-review";
import { applyProviderEvent } from "~/.server/services/order-webhook";
import { createPlan } from "~/.server/services/plans";
import { addDays, todayIn } from "~/lib/dates";
import { makeUser } from "./helpers";

/** A published listing of a four-week plan and a pending order for it, made directly (no provider involved). */
async function pendingOrder() {
  const coach = await makeUser({ role: "coach", name: "Seller" });
  const plan = await createPlan(coach.id, {
    name: "Sold",
    sport: "bike",
    description: "",
    alignment: "start",
    date: "2027-01-04",
    weeks: 4,
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  const s = await ShelfSession.create({ ownerId: coach.id, name: "Steady", sport: "bike" });
  await ShelfBlock.create({
    sessionId: s.id,
    position: 0,
    kind: "steady",
    spec: { kind: "steady", durationS: 2400, target: { metric: "power", lowPct: 88, highPct: 92 } },
  });
  for (const w of await PlanWeek.findAll({ where: { planId: plan.id } }))
    await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId: s.id, toWeek: w.id, toDay: 3, toIndex: 0 });
  const listing = await Listing.create({
    planId: plan.id,
    coachId: coach.id,
    slug: `sold-${plan.id}`,
    title: "Sold",
    description: "Four weeks.",
    sport: "bike",
    level: "intermediate",
    weeks: 4,
    weeklyHours: 8,
    priceCents: 4900,
    currency: "EUR",
    published: true,
  });
  const buyer = await makeUser({ role: "athlete", name: "Buyer" });
  await Threshold.create({
    athleteId: buyer.id,
    sport: "bike",
    metric: "power",
    value: 240,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  const order = await Order.create({
    listingId: listing.id,
    buyerId: buyer.id,
    amountCents: 4900,
    currency: "EUR",
    alignMode: "start",
    alignDate: addDays(todayIn("UTC"), 7),
    checkoutSessionId: `cs_jobs_${plan.id}`,
  });
  return { coach, buyer, order };
}

/** The provider's event for a payment (two event types report the same one) or a full refund of it. */
function event(
  order: Order,
  type: "checkout.session.completed" | "payment_intent.succeeded" | "charge.refunded",
  id = `evt_${order.id}_${type}`,
) {
  const meta = { orderId: String(order.id) };
  const pi = `pi_jobs_${order.id}`;
  const object = {
    "checkout.session.completed": {
      id: order.checkoutSessionId,
      object: "checkout.session",
      amount_total: 4900,
      currency: "eur",
      metadata: meta,
      payment_intent: pi,
      payment_status: "paid",
    },
    "payment_intent.succeeded": {
      id: pi,
      object: "payment_intent",
      amount: 4900,
      amount_received: 4900,
      currency: "eur",
      metadata: meta,
    },
    "charge.refunded": {
      id: `ch_${order.id}`,
      object: "charge",
      payment_intent: pi,
      amount: 4900,
      amount_refunded: 4900,
      currency: "eur",
      metadata: meta,
      refunds: { data: [{ id: `re_${order.id}`, amount: 4900, status: "succeeded" }] },
    },
  }[type];
  const e = { id, type, created: Math.floor(Date.now() / 1000), data: { object } };
  return applyProviderEvent(e, JSON.stringify(e));
}

const placements = (buyerId: number) => Assignment.count({ where: { athleteId: buyerId } });
const templates = async (to: string) =>
  (await OutboundEmail.findAll({ where: { toAddress: to }, order: [["id", "ASC"]] })).map((m) => m.template);
const jobsOf = (orderId: number) => Job.findAll({ where: { orderId }, order: [["id", "ASC"]] });

describe("webhook follow-ups as claimed jobs", () => {
  it("the webhook only enqueues: the order is paid at once, the plan lands when the job runs", async () => {
    const { buyer, order } = await pendingOrder();
    expect(await event(order, "checkout.session.completed")).toMatchObject({ status: "fulfilled" });
    expect(await placements(buyer.id)).toBe(0);
    expect((await jobsOf(order.id)).map((j) => [j.kind, j.jobKey, j.status])).toEqual([
      ["place", `order:${order.id}:place`, "pending"],
    ]);
    expect(await runOrderFollowUps({ orderId: order.id })).toMatchObject({ done: 1, failed: 0, retried: 0 });
    expect(await placements(buyer.id)).toBe(1);
    expect(await ScheduledSession.count({ where: { athleteId: buyer.id, status: "planned" } })).toBeGreaterThanOrEqual(
      4,
    );
    expect(await templates(buyer.email)).toEqual(["receipt"]);
    expect((await jobsOf(order.id))[0].status).toBe("done");
  });

  it("a repeated webhook event and a second event for the same payment enqueue one job and place once", async () => {
    const { buyer, order } = await pendingOrder();
    await event(order, "checkout.session.completed");
    expect(await event(order, "checkout.session.completed")).toMatchObject({ outcome: "duplicate" });
    await event(order, "payment_intent.succeeded");
    expect(await jobsOf(order.id)).toHaveLength(1);
    await runOrderFollowUps({ orderId: order.id });
    // Arriving after the placement, the same payment again enqueues nothing.
    await event(order, "payment_intent.succeeded", `evt_${order.id}_late`);
    expect(await jobsOf(order.id)).toHaveLength(1);
    expect(await runOrderFollowUps({ orderId: order.id })).toMatchObject({ done: 0 });
    expect(await placements(buyer.id)).toBe(1);
    expect(await templates(buyer.email)).toEqual(["receipt"]);
  });

  it("one event delivered twice at the same moment is applied once; the other answer is a duplicate", async () => {
    const { buyer, order } = await pendingOrder();
    const outcomes = (
      await Promise.all([event(order, "checkout.session.completed"), event(order, "checkout.session.completed")])
    )
      .map((r) => r.outcome)
      .sort();
    expect(outcomes).toEqual(["duplicate", "paid"].sort());
    expect(await jobsOf(order.id)).toHaveLength(1);
    await runOrderFollowUps({ orderId: order.id });
    expect(await placements(buyer.id)).toBe(1);
  });

  it("two runners claiming at once place the plan once", async () => {
    const orders = await Promise.all([pendingOrder(), pendingOrder(), pendingOrder()]);
    for (const { order } of orders) await event(order, "checkout.session.completed");
    const runs = await Promise.all([runOrderFollowUps(), runOrderFollowUps(), runOrderFollowUps()]);
    expect(runs.reduce((n, r) => n + r.done, 0)).toBeGreaterThanOrEqual(3);
    for (const { buyer, order } of orders) {
      expect(await placements(buyer.id)).toBe(1);
      expect(await templates(buyer.email)).toEqual(["receipt"]);
      expect((await jobsOf(order.id)).map((j) => [j.status, j.attempts])).toEqual([["done", 1]]);
    }
  });

  it("a runner whose lease ran out cannot mark the job done twice; the order's marks keep one placement", async () => {
    const { buyer, order } = await pendingOrder();
    await event(order, "checkout.session.completed");
    // The first runner is slow: while its handler runs, its lease runs out and a second runner claims the job.
    // On PostgreSQL both then race for the order's row lock; SQLite's single writer lets the second claim only
    // after the first committed.
    const pg = dialect() === "postgres";
    let expired!: () => void;
    const leaseGone = new Promise<void>((r) => (expired = r));
    const slow = {
      ...ORDER_FOLLOW_UPS,
      place: {
        async run(job: Job, t: Transaction) {
          await Job.update(
            { nextAttemptAt: new Date(Date.now() - 1000) },
            { where: { id: job.id }, transaction: pg ? undefined : t },
          );
          expired();
          for (let i = 0; pg && i < 100 && (await Job.findByPk(job.id))!.attempts < 2; i++)
            await new Promise((r) => setTimeout(r, 50));
          await ORDER_FOLLOW_UPS.place.run(job, t);
        },
      },
    };
    const first = runDueJobs(slow, { orderId: order.id });
    await leaseGone;
    const second = runOrderFollowUps({ orderId: order.id });
    const [a, b] = await Promise.all([first, second]);
    expect(a.done + b.done).toBe(1);
    expect(await placements(buyer.id)).toBe(1);
    expect(await templates(buyer.email)).toEqual(["receipt"]);
    expect((await jobsOf(order.id))[0].status).toBe("done");
  });

  it("a failing follow-up is retried with backoff, and lands once it succeeds", async () => {
    const { buyer, order } = await pendingOrder();
    await event(order, "checkout.session.completed");
    let failures = 2;
    const flaky = {
      ...ORDER_FOLLOW_UPS,
      place: {
        ...ORDER_FOLLOW_UPS.place,
        run: async (...a: Parameters<(typeof ORDER_FOLLOW_UPS)["place"]["run"]>) =>
          failures-- > 0 ? Promise.reject(new Error("calendar store unavailable")) : ORDER_FOLLOW_UPS.place.run(...a),
      },
    };
    for (let attempt = 1; attempt <= 2; attempt++) {
      const before = Date.now();
      expect(await runDueJobs(flaky, { orderId: order.id })).toMatchObject({ done: 0, retried: 1 });
      const [job] = await jobsOf(order.id);
      expect(job).toMatchObject({ status: "pending", attempts: attempt, lastError: "calendar store unavailable" });
      // Not due again before its backoff: a run now claims nothing.
      expect(job.nextAttemptAt.getTime()).toBeGreaterThanOrEqual(before + jobBackoffMs(attempt) - 50);
      expect(await runDueJobs(flaky, { orderId: order.id })).toMatchObject({ done: 0, retried: 0 });
      expect(await placements(buyer.id)).toBe(0);
      // Time passes (the row is made due rather than the test sleeping).
      await job.update({ nextAttemptAt: new Date(Date.now() - 1000) });
    }
    expect(await runDueJobs(flaky, { orderId: order.id })).toMatchObject({ done: 1 });
    expect(await placements(buyer.id)).toBe(1);
    expect((await jobsOf(order.id))[0]).toMatchObject({ status: "done", attempts: 3, lastError: null });
    await order.reload();
    expect(order.status).toBe("fulfilled");
  });

  it("after repeated failure the job is failed and the order waits for review; delivering then places it", async () => {
    const { buyer, coach, order } = await pendingOrder();
    await event(order, "checkout.session.completed");
    const broken = {
      ...ORDER_FOLLOW_UPS,
      place: { ...ORDER_FOLLOW_UPS.place, run: () => Promise.reject(new Error("calendar store unavailable")) },
    };
    for (let i = 0; i < JOB_MAX_ATTEMPTS; i++) {
      await runDueJobs(broken, { orderId: order.id });
      await Job.update(
        { nextAttemptAt: new Date(Date.now() - 1000) },
        { where: { orderId: order.id, status: "pending" } },
      );
    }
    const [job] = await jobsOf(order.id);
    expect(job).toMatchObject({ kind: "place", status: "failed", attempts: JOB_MAX_ATTEMPTS });
    await order.reload();
    expect(order.status).toBe("needs_review");
    expect(order.reviewReason).toMatch(
      /Placing the plan on the buyer's calendar failed 5 times \(calendar store unavailable\)/,
    );
    await runOrderFollowUps({ orderId: order.id });
    expect(await templates(coach.email)).toEqual(["order-review"]);
    expect(await placements(buyer.id)).toBe(0);
    // The coach delivers: the same key is armed again and the plan lands, once.
    await resolveReview(coach, order.id, "deliver");
    expect(await placements(buyer.id)).toBe(1);
    expect((await jobsOf(order.id)).find((j) => j.kind === "place")).toMatchObject({ status: "done", attempts: 1 });
    expect(await templates(buyer.email)).toEqual(["receipt"]);
  });

  it("paid and refunded before any runner came by: nothing is placed, the buyer is told once", async () => {
    const { buyer, order } = await pendingOrder();
    await event(order, "checkout.session.completed");
    await event(order, "charge.refunded");
    expect((await jobsOf(order.id)).map((j) => j.kind)).toEqual(["place", "unplace"]);
    await runOrderFollowUps({ orderId: order.id });
    expect(await placements(buyer.id)).toBe(0);
    expect(await templates(buyer.email)).toEqual(["refund-notice"]);
    expect((await jobsOf(order.id)).map((j) => j.status)).toEqual(["done", "done"]);
  });
});
