import http from "node:http";
import net from "node:net";
import Stripe from "stripe";
import { Op } from "sequelize";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { RouterContextProvider } from "react-router";
import { resetEnvCache } from "~/.server/env";
import { startFakePayments, TEST_CARDS } from "~/.server/fakes/payments";
import {
  Listing,
  OutboundEmail,
  Order,
  PaymentEvent,
  PlanWeek,
  ScheduledBlock,
  ScheduledSession,
  ShelfSession,
  ShelfBlock,
  Threshold,
  type User,
} from "~/.server/models";
import { applyBoardOp } from "~/.server/services/board";
import { assignPlan } from "~/.server/services/materialize";
import { runOrderFollowUps } from "~/.server/services/order-follow-ups";
import { deriveStatus } from "~/.server/services/orders";
import { createPlan } from "~/.server/services/plans";
import * as coachShop from "~/routes/coach/shop";
import * as listingPage from "~/routes/shop/listing";
import { firstMessage, messageOf } from "~/lib/forms";
import * as orderPage from "~/routes/shop/order";
import * as webhook from "~/routes/webhooks/payments";
import { addDays, todayIn } from "~/lib/dates";
import { firstMondayAfter } from "~/lib/placement";
import { CoachAthlete } from "~/.server/models";
import { formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const SECRET = "whsec_test_integration";
const signer = new Stripe("sk_test_signer", { telemetry: false });
let fake: Awaited<ReturnType<typeof startFakePayments>>;
let forwarder: http.Server;

const freePort = () =>
  new Promise<number>((r) => {
    const s = net.createServer().listen(0, "127.0.0.1", () => {
      const p = (s.address() as net.AddressInfo).port;
      s.close(() => r(p));
    });
  });

/** The webhook route's answer; then the follow-ups it enqueued run, as an app instance's prompt runner does. */
const post = async (body: string, signature: string | null) => {
  const res = (await webhook.action({
    request: new Request("http://localhost:3999/webhooks/payments", {
      method: "POST",
      body,
      headers: signature === null ? {} : { "stripe-signature": signature },
    }),
    params: {},
    context: new RouterContextProvider(),
  } as never)) as Response;
  await runOrderFollowUps();
  return res;
};

beforeAll(async () => {
  // The fake provider posts webhooks over HTTP; this forwarder hands them to the route's action as a Request.
  forwarder = http.createServer(async (req, res) => {
    let body = "";
    for await (const c of req) body += c;
    const r = await post(body, String(req.headers["stripe-signature"] ?? ""));
    res.writeHead(r.status, { "Content-Type": "application/json" }).end(await r.text());
  });
  await new Promise<void>((r) => forwarder.listen(0, "127.0.0.1", r));
  const port = await freePort();
  process.env.FAKE_PAYMENTS_PORT = String(port);
  process.env.STRIPE_WEBHOOK_SECRET = SECRET;
  process.env.PORT = "3999";
  resetEnvCache();
  fake = await startFakePayments({
    port,
    webhookUrl: `http://127.0.0.1:${(forwarder.address() as net.AddressInfo).port}/`,
    webhookSecret: SECRET,
  });
});
afterAll(async () => {
  await fake?.settle();
  await fake?.close();
  forwarder?.close();
});

async function shopScenario(price = "49.00") {
  const coach = await makeUser({ role: "coach", name: "Seller Coach" });
  const coachCookie = await signIn(coach.email);
  const plan = await createPlan(coach.id, {
    name: "Sold plan",
    sport: "bike",
    description: "",
    alignment: "start",
    date: "2027-01-04",
    weeks: 4,
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  const s = await ShelfSession.create({ ownerId: coach.id, name: "Sweet spot", sport: "bike" });
  await ShelfBlock.create({
    sessionId: s.id,
    position: 0,
    kind: "steady",
    spec: { kind: "steady", durationS: 2400, target: { metric: "power", lowPct: 88, highPct: 92 } },
  });
  for (const w of await PlanWeek.findAll({ where: { planId: plan.id } }))
    await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId: s.id, toWeek: w.id, toDay: 3, toIndex: 0 });
  const created = await run(
    coachShop.action,
    formRequest(
      "/coach/shop",
      {
        intent: "create",
        planId: String(plan.id),
        title: "Winter base block",
        description: "Four weeks of steady work.",
        level: "intermediate",
        price,
        currency: "EUR",
      },
      { cookie: coachCookie },
    ),
  );
  expect(payloadOf(created).status).toBe("success");
  const listing = (await Listing.findOne({ where: { planId: plan.id } }))!;
  await run(
    coachShop.action,
    formRequest("/coach/shop", { intent: "publish", listingId: String(listing.id) }, { cookie: coachCookie }),
  );
  const buyer = await makeUser({ role: "athlete", name: "Buyer B" });
  await Threshold.create({
    athleteId: buyer.id,
    sport: "bike",
    metric: "power",
    value: 240,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  const buyerCookie = await signIn(buyer.email);
  return { coach, coachCookie, listing, plan, buyer, buyerCookie };
}

async function checkout(
  slug: string,
  cookie: string,
  date = addDays(todayIn("UTC"), 7),
  extra: Record<string, string> = {},
  base = "http://localhost:3999",
) {
  const req = formRequest(`/shop/${slug}`, { mode: "start", date, ...extra }, { cookie });
  const res = await run(
    listingPage.action,
    new Request(base + `/shop/${slug}`, { method: "POST", body: await req.text(), headers: req.headers }),
    { slug },
  );
  expect(statusOf(res)).toBe(302);
  const url = (res as Response).headers.get("location")!;
  expect(url).toMatch(/\/pay\/cs_test_/);
  return url;
}

const pay = (url: string, fields: Record<string, string>) =>
  fetch(url, { method: "POST", body: new URLSearchParams(fields), redirect: "manual" });
const planned = (athleteId: number) => ScheduledSession.count({ where: { athleteId, status: "planned" } });
const mails = async (...people: User[]) =>
  (await OutboundEmail.findAll({ where: { toAddress: people.map((p) => p.email) }, order: [["id", "ASC"]] })).map(
    (m) => m.template,
  );

/* ---------- table-driven provider event sequences ---------- */

type Step = {
  type: string;
  at: number;
  key?: string;
  amount?: number;
  pi?: string;
  refund?: { id: string; amount: number };
  meta?: boolean;
};
type Ctx = { order: Order; sessionId: string };

/** A provider event as the real service shapes it, for one order; `at` is the provider's clock (seconds). */
function eventFor(ctx: Ctx, step: Step, t0: number) {
  const meta = { orderId: String(ctx.order.id) };
  const pi = step.pi ?? `pi_${ctx.order.id}_one`;
  const amount = step.amount ?? ctx.order.amountCents;
  const session = {
    id: ctx.sessionId,
    object: "checkout.session",
    amount_total: amount,
    currency: "eur",
    metadata: meta,
    payment_intent: pi,
    payment_status: "paid",
  };
  const objects: Record<string, unknown> = {
    "checkout.session.completed": session,
    "checkout.session.async_payment_failed": { ...session, payment_intent: null, payment_status: "unpaid" },
    "checkout.session.expired": { ...session, payment_intent: null, payment_status: "unpaid" },
    "payment_intent.succeeded": {
      id: pi,
      object: "payment_intent",
      amount,
      amount_received: amount,
      currency: "eur",
      metadata: meta,
    },
    "charge.refunded": {
      id: `ch_${ctx.order.id}`,
      object: "charge",
      payment_intent: pi,
      amount,
      amount_refunded: step.refund?.amount ?? amount,
      currency: "eur",
      metadata: step.meta ? meta : {},
      refunds: {
        data: [
          { id: step.refund?.id ?? `re_${ctx.order.id}`, amount: step.refund?.amount ?? amount, status: "succeeded" },
        ],
      },
    },
    "charge.dispute.created": {
      id: `dp_${ctx.order.id}`,
      object: "dispute",
      payment_intent: pi,
      amount,
      currency: "eur",
    },
  };
  return {
    id: `evt_${ctx.order.id}_${step.key ?? `${step.type}_${step.at}`}`,
    object: "event",
    type: step.type,
    created: t0 + step.at,
    data: { object: objects[step.type] },
  };
}

async function deliverSigned(event: object, opts: { unsigned?: boolean } = {}) {
  const payload = JSON.stringify(event);
  return post(payload, opts.unsigned ? null : signer.webhooks.generateTestHeaderString({ payload, secret: SECRET }));
}

const PAID: Step = { type: "checkout.session.completed", at: 2 };
const DECLINED: Step = { type: "checkout.session.async_payment_failed", at: 1 };
const EXPIRED: Step = { type: "checkout.session.expired", at: 1 };
const REFUNDED: Step = { type: "charge.refunded", at: 5 };

const SEQUENCES: {
  name: string;
  steps: Step[];
  status: string;
  sessions: "placed" | "none";
  buyerMails: string[];
  coachMails?: string[];
  unsigned?: boolean;
  reason?: RegExp;
}[] = [
  { name: "paid", steps: [PAID], status: "fulfilled", sessions: "placed", buyerMails: ["receipt"] },
  {
    name: "declined, then paid on the same page (retry)",
    steps: [DECLINED, PAID],
    status: "fulfilled",
    sessions: "placed",
    buyerMails: ["receipt"],
  },
  {
    name: "retry delivered reversed (payment before the decline)",
    steps: [PAID, DECLINED],
    status: "fulfilled",
    sessions: "placed",
    buyerMails: ["receipt"],
  },
  {
    name: "payment delivered twice (same event id)",
    steps: [PAID, PAID],
    status: "fulfilled",
    sessions: "placed",
    buyerMails: ["receipt"],
  },
  {
    name: "one payment reported by two event types",
    steps: [PAID, { type: "payment_intent.succeeded", at: 2 }],
    status: "fulfilled",
    sessions: "placed",
    buyerMails: ["receipt"],
  },
  {
    name: "paid, then refunded at the provider",
    steps: [PAID, REFUNDED],
    status: "refunded",
    sessions: "none",
    buyerMails: ["receipt", "refund-notice"],
  },
  {
    name: "refund delivered before the payment (reversed)",
    steps: [REFUNDED, PAID],
    status: "refunded",
    sessions: "none",
    buyerMails: ["refund-notice"],
  },
  {
    name: "refund naming the order delivered before the payment",
    steps: [{ ...REFUNDED, meta: true }, PAID],
    status: "refunded",
    sessions: "none",
    buyerMails: ["refund-notice"],
    coachMails: ["order-review"],
  },
  {
    name: "refund duplicated (same event, and a new event for the same refund)",
    steps: [PAID, REFUNDED, REFUNDED, { ...REFUNDED, key: "again" }],
    status: "refunded",
    sessions: "none",
    buyerMails: ["receipt", "refund-notice"],
  },
  {
    name: "partial refund",
    steps: [PAID, { ...REFUNDED, refund: { id: "re_half", amount: 2450 } }],
    status: "needs_review",
    sessions: "placed",
    buyerMails: ["receipt"],
    coachMails: ["order-review"],
    reason: /Partly refunded/,
  },
  { name: "checkout expired", steps: [EXPIRED], status: "expired", sessions: "none", buyerMails: [] },
  {
    name: "paid after the checkout expired",
    steps: [EXPIRED, PAID],
    status: "needs_review",
    sessions: "none",
    buyerMails: [],
    coachMails: ["order-review"],
    reason: /after the checkout had expired/,
  },
  {
    name: "paid after expiry, delivered reversed",
    steps: [PAID, EXPIRED],
    status: "needs_review",
    sessions: "placed",
    buyerMails: ["receipt"],
    coachMails: ["order-review"],
    reason: /after the checkout had expired/,
  },
  {
    name: "an expiry stamped after the payment is stale",
    steps: [PAID, { ...EXPIRED, at: 9 }],
    status: "fulfilled",
    sessions: "placed",
    buyerMails: ["receipt"],
  },
  {
    name: "declined twice, then the checkout expired",
    steps: [DECLINED, { ...DECLINED, at: 2 }, { ...EXPIRED, at: 3 }],
    status: "expired",
    sessions: "none",
    buyerMails: [],
  },
  {
    name: "tampered amount",
    steps: [{ ...PAID, amount: 100 }],
    status: "needs_review",
    sessions: "none",
    buyerMails: [],
    coachMails: ["order-review"],
    reason: /Paid €1.00, expected €49.00/,
  },
  {
    name: "a second, different payment for the same order",
    steps: [PAID, { ...PAID, at: 3, pi: "pi_other" }],
    status: "needs_review",
    sessions: "placed",
    buyerMails: ["receipt"],
    coachMails: ["order-review"],
    reason: /paid twice/,
  },
  {
    name: "dispute after payment",
    steps: [PAID, { type: "charge.dispute.created", at: 8 }],
    status: "needs_review",
    sessions: "placed",
    buyerMails: ["receipt"],
    coachMails: ["order-review"],
    reason: /disputed/,
  },
  { name: "unsigned payment", steps: [PAID], unsigned: true, status: "created", sessions: "none", buyerMails: [] },
];

describe("provider event sequences end in one state, whatever their order", () => {
  for (const row of SEQUENCES) {
    it(`${row.name} → ${row.status}`, async () => {
      const { listing, buyer, buyerCookie, coach } = await shopScenario();
      await checkout(listing.slug, buyerCookie);
      const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
      const t0 = Math.floor(Date.now() / 1000);
      for (const step of row.steps) {
        const res = await deliverSigned(eventFor({ order, sessionId: order.checkoutSessionId! }, step, t0), {
          unsigned: row.unsigned,
        });
        expect(res.status).toBe(row.unsigned ? 400 : 200);
      }
      await order.reload();
      expect(order.status).toBe(row.status);
      if (row.reason) expect(order.reviewReason).toMatch(row.reason);
      if (row.sessions === "placed") expect(await planned(buyer.id)).toBeGreaterThanOrEqual(4);
      else expect(await planned(buyer.id)).toBe(0);
      expect(await mails(buyer)).toEqual(row.buyerMails);
      expect(await mails(coach)).toEqual(row.coachMails ?? []);
      // Replaying the whole sequence changes nothing more: every event id is known.
      for (const step of row.steps)
        if (!row.unsigned)
          expect(
            await (await deliverSigned(eventFor({ order, sessionId: order.checkoutSessionId! }, step, t0))).json(),
          ).toMatchObject({ outcome: "duplicate" });
      await order.reload();
      expect(order.status).toBe(row.status);
      expect(await mails(buyer)).toEqual(row.buyerMails);
    });
  }

  it("events interleaved across two orders settle each order on its own", async () => {
    const a = await shopScenario();
    await checkout(a.listing.slug, a.buyerCookie);
    const orderA = (await Order.findOne({ where: { buyerId: a.buyer.id } }))!;
    const bBuyer = await makeUser({ role: "athlete", name: "Second Buyer" });
    await Threshold.create({
      athleteId: bBuyer.id,
      sport: "bike",
      metric: "power",
      value: 200,
      unit: "W",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });
    await checkout(a.listing.slug, await signIn(bBuyer.email));
    const orderB = (await Order.findOne({ where: { buyerId: bBuyer.id } }))!;
    const t0 = Math.floor(Date.now() / 1000);
    const A = { order: orderA, sessionId: orderA.checkoutSessionId! };
    const B = { order: orderB, sessionId: orderB.checkoutSessionId! };
    for (const [ctx, step] of [
      [A, PAID],
      [B, DECLINED],
      [A, REFUNDED],
      [B, PAID],
      [A, PAID],
      [B, DECLINED],
    ] as const)
      expect((await deliverSigned(eventFor(ctx, step, t0))).status).toBe(200);
    await orderA.reload();
    await orderB.reload();
    expect([orderA.status, orderB.status]).toEqual(["refunded", "fulfilled"]);
    expect(await planned(a.buyer.id)).toBe(0);
    expect(await planned(bBuyer.id)).toBeGreaterThanOrEqual(4);
    expect(await mails(a.buyer)).toEqual(["receipt", "refund-notice"]);
    expect(await mails(bBuyer)).toEqual(["receipt"]);
  });

  it("a payment for no known order is kept and shown to admins, not dropped", async () => {
    const ghost = { order: { id: 987654, amountCents: 4900 } as Order, sessionId: "cs_test_ghost" };
    const res = await deliverSigned(eventFor(ghost, PAID, Math.floor(Date.now() / 1000)));
    expect(await res.json()).toMatchObject({ outcome: "no-order" });
    const admin = await makeUser({ role: "admin" });
    const page = payloadOf(await run(coachShop.loader, getRequest("/coach/shop", await signIn(admin.email))));
    expect(page.unmatched.map((e: { providerEventId: string }) => e.providerEventId)).toContain(
      "evt_987654_checkout.session.completed_2",
    );
    const coach = await makeUser({ role: "coach" });
    expect(
      payloadOf(await run(coachShop.loader, getRequest("/coach/shop", await signIn(coach.email)))).unmatched,
    ).toEqual([]);
  });

  it("the state follows from the facts alone (the machine's table)", () => {
    const base = {
      amountCents: 4900,
      paidCents: null,
      refundedCents: 0,
      reviewReason: null,
      expiredAt: null,
      declinedCount: 0,
    };
    expect(deriveStatus(base)).toBe("created");
    expect(deriveStatus({ ...base, declinedCount: 2 })).toBe("declined");
    expect(deriveStatus({ ...base, declinedCount: 2, paidCents: 4900 })).toBe("fulfilled");
    expect(deriveStatus({ ...base, expiredAt: new Date() })).toBe("expired");
    expect(deriveStatus({ ...base, paidCents: 4900, refundedCents: 4900, reviewReason: "x" })).toBe("refunded");
    expect(deriveStatus({ ...base, paidCents: 4900, reviewReason: "x" })).toBe("needs_review");
  });
});

/* ---------- through the local provider, as a buyer and a coach click ---------- */

describe("plan shop against the local payment provider", () => {
  it("a declined card and then the good card on the same pay page ends paid, with sessions and one receipt", async () => {
    const { listing, buyer, buyerCookie } = await shopScenario();
    const url = await checkout(listing.slug, buyerCookie);
    const declined = await pay(url, { action: "pay", card: TEST_CARDS.declined });
    expect(await declined.text()).toContain("declined");
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    expect(order.status).toBe("declined");
    const paid = await pay(url, { action: "pay", card: TEST_CARDS.success });
    expect(paid.status).toBe(303);
    await order.reload();
    expect(order).toMatchObject({ status: "fulfilled", declinedCount: 1, paidCents: 4900 });
    expect(await planned(buyer.id)).toBeGreaterThanOrEqual(4);
    const block = await ScheduledBlock.findOne({ where: { athleteId: buyer.id, metric: "power", lowPct: 88 } });
    expect(block).toMatchObject({ lowAbs: Math.round((88 * 240) / 100), highAbs: Math.round((92 * 240) / 100) });
    const receipt = await OutboundEmail.findOne({ where: { toAddress: buyer.email, template: "receipt" } });
    expect(receipt!.textBody).toContain("€49.00");
    const page = payloadOf(
      await run(orderPage.loader, getRequest(`/shop/orders/${order.id}`, buyerCookie), { orderId: String(order.id) }),
    );
    expect(page.order.status).toBe("fulfilled");
  });

  it("a cancelled checkout expires with nothing placed; paying afterwards goes to review, not to nowhere", async () => {
    const { listing, buyer, buyerCookie, coach, coachCookie } = await shopScenario();
    const url = await checkout(listing.slug, buyerCookie);
    const cancelled = await pay(url, { action: "cancel" });
    expect(cancelled.headers.get("location")).toMatch(/cancelled=1/);
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    expect(order.status).toBe("expired");
    await pay(url, { action: "pay", card: TEST_CARDS.success });
    await order.reload();
    expect(order.status).toBe("needs_review");
    expect(await planned(buyer.id)).toBe(0);
    expect(await mails(coach)).toEqual(["order-review"]);
    const page = payloadOf(await run(coachShop.loader, getRequest("/coach/shop", coachCookie)));
    expect(page.review.map((r: { id: number }) => r.id)).toEqual([order.id]);
    // Admins see it across the studio; another coach neither sees nor resolves it.
    const admin = await makeUser({ role: "admin" });
    const adminPage = payloadOf(await run(coachShop.loader, getRequest("/coach/shop", await signIn(admin.email))));
    expect(adminPage.review.map((r: { id: number }) => r.id)).toContain(order.id);
    const other = await signIn((await makeUser({ role: "coach" })).email);
    expect(payloadOf(await run(coachShop.loader, getRequest("/coach/shop", other))).review).toEqual([]);
    expect(
      statusOf(
        await run(
          coachShop.action,
          formRequest("/coach/shop", { intent: "deliver", orderId: String(order.id) }, { cookie: other }),
        ),
      ),
    ).toBe(404);
    const close = await run(
      coachShop.action,
      formRequest("/coach/shop", { intent: "close", orderId: String(order.id) }, { cookie: coachCookie }),
    );
    expect(firstMessage(payloadOf(close))).toMatch(/Money was paid/);
    // The coach delivers: the plan lands and the receipt goes out once.
    const res = await run(
      coachShop.action,
      formRequest("/coach/shop", { intent: "deliver", orderId: String(order.id) }, { cookie: coachCookie }),
    );
    expect(payloadOf(res).status).toBe("success");
    await order.reload();
    expect(order.status).toBe("fulfilled");
    expect(await planned(buyer.id)).toBeGreaterThanOrEqual(4);
    expect(await mails(buyer)).toEqual(["receipt"]);
    expect(payloadOf(await run(coachShop.loader, getRequest("/coach/shop", coachCookie))).review).toEqual([]);
  });

  it("a coach's refund removes future sessions, keeps past ones, sends one notice; refunding twice does nothing", async () => {
    const { listing, buyer, buyerCookie, coachCookie } = await shopScenario();
    const url = await checkout(listing.slug, buyerCookie, todayIn("UTC"));
    await pay(url, { action: "pay", card: TEST_CARDS.success });
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    // One session of this order already lies in the past and one was done: both stay.
    const sessions = await ScheduledSession.findAll({
      where: { assignmentId: order.assignmentId! },
      order: [["date", "ASC"]],
    });
    await sessions[0].update({ date: addDays(todayIn("UTC"), -3) });
    await sessions[1].update({ status: "done" });
    const stranger = await makeUser({ role: "coach" });
    const denied = await run(
      coachShop.action,
      formRequest(
        "/coach/shop",
        { intent: "refund", orderId: String(order.id) },
        { cookie: await signIn(stranger.email) },
      ),
    );
    expect(statusOf(denied)).toBe(404);
    const res = await run(
      coachShop.action,
      formRequest("/coach/shop", { intent: "refund", orderId: String(order.id) }, { cookie: coachCookie }),
    );
    expect(payloadOf(res)).toMatchObject({
      status: "success",
      message: expect.stringMatching(/Refunded; \d+ future sessions? removed/),
    });
    await fake.settle();
    const again = await run(
      coachShop.action,
      formRequest("/coach/shop", { intent: "refund", orderId: String(order.id) }, { cookie: coachCookie }),
    );
    expect(payloadOf(again).message).toMatch(/Already refunded/);
    await order.reload();
    expect(order).toMatchObject({ status: "refunded", refundedCents: 4900 });
    const left = await ScheduledSession.findAll({ where: { assignmentId: order.assignmentId! } });
    expect(left.filter((s) => s.status === "planned").map((s) => s.id)).toEqual([sessions[0].id]);
    expect(left.find((s) => s.id === sessions[1].id)!.status).toBe("done");
    expect(await mails(buyer)).toEqual(["receipt", "refund-notice"]);
    // The provider's own charge.refunded for that refund arrived too, and changed nothing more.
    expect(await PaymentEvent.count({ where: { orderId: order.id, type: "charge.refunded" } })).toBe(1);
    const sales = payloadOf(await run(coachShop.loader, getRequest("/coach/shop", coachCookie))).sales;
    expect(sales.find((s: { id: number }) => s.id === order.id)).toMatchObject({
      status: "refunded",
      label: "refunded",
    });
  });

  it("two refund clicks at once make one refund at the provider and one notice", async () => {
    const { listing, buyer, buyerCookie, coachCookie } = await shopScenario();
    await pay(await checkout(listing.slug, buyerCookie), { action: "pay", card: TEST_CARDS.success });
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    const click = () =>
      run(
        coachShop.action,
        formRequest("/coach/shop", { intent: "refund", orderId: String(order.id) }, { cookie: coachCookie }),
      );
    const messages = (await Promise.all([click(), click()])).map((r) => payloadOf(r).message as string).sort();
    expect(messages[0]).toMatch(/^(A refund for this order is already on its way|Already refunded)/);
    expect(messages[1]).toMatch(/^Refunded; /);
    await fake.settle();
    await order.reload();
    expect(order).toMatchObject({ status: "refunded", refundedCents: 4900 });
    expect(Object.keys(order.refunds)).toHaveLength(1);
    expect(await PaymentEvent.count({ where: { orderId: order.id, type: "charge.refunded" } })).toBe(1);
    expect(await mails(buyer)).toEqual(["receipt", "refund-notice"]);
  });

  it("a refund made at the provider removes the buyer's future sessions and tells them", async () => {
    const { listing, buyer, buyerCookie } = await shopScenario();
    const url = await checkout(listing.slug, buyerCookie);
    await pay(url, { action: "pay", card: TEST_CARDS.success });
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    expect(await planned(buyer.id)).toBeGreaterThan(0);
    await fake.refundAtProvider(order.checkoutSessionId!).job;
    await order.reload();
    expect(order.status).toBe("refunded");
    expect(await planned(buyer.id)).toBe(0);
    expect(await mails(buyer)).toEqual(["receipt", "refund-notice"]);
  });

  it("a tampered signature gets 400 and records nothing", async () => {
    const { listing, buyer, buyerCookie } = await shopScenario();
    await checkout(listing.slug, buyerCookie);
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    const payload = JSON.stringify({
      id: "evt_forged",
      object: "event",
      type: "checkout.session.completed",
      data: {
        object: {
          id: order.checkoutSessionId,
          amount_total: 4900,
          currency: "eur",
          metadata: { orderId: String(order.id) },
          payment_status: "paid",
        },
      },
    });
    expect((await post(payload, "t=1,v1=deadbeef")).status).toBe(400);
    await order.reload();
    expect(order.status).toBe("created");
    expect(await PaymentEvent.count({ where: { providerEventId: "evt_forged" } })).toBe(0);
  });

  it("the provider returns the buyer to the host they are on when it is allowed, else to APP_URL", async () => {
    const { listing, buyerCookie } = await shopScenario();
    const onLoopback = await checkout(listing.slug, buyerCookie, undefined, {}, "http://127.0.0.1:3999");
    expect(fake.sessions.get(onLoopback.split("/pay/")[1])!.success_url).toMatch(
      /^http:\/\/127\.0\.0\.1:3999\/shop\/orders\/\d+\?session=/,
    );
    expect(fake.sessions.get(onLoopback.split("/pay/")[1])!.cancel_url).toMatch(
      /^http:\/\/127\.0\.0\.1:3999\/shop\/orders\/\d+\?cancelled=1/,
    );
    const elsewhere = await checkout(listing.slug, buyerCookie, undefined, {}, "http://evil.example:3999");
    expect(fake.sessions.get(elsewhere.split("/pay/")[1])!.success_url).toMatch(
      /^http:\/\/localhost:3999\/shop\/orders\//,
    );
  });
});

/* ---------- listings ---------- */

describe("listings", () => {
  const PRICES: [string, number | RegExp][] = [
    ["0.001", /at most two decimals/],
    ["0.004", /at most two decimals/],
    ["1e-300", /at most two decimals/],
    ["0", /at least 0.50/],
    ["0.49", /at least 0.50/],
    ["-5", /at most two decimals/],
    ["abc", /at most two decimals/],
    ["10000.01", /at most 10,000/],
    ["0.50", 50],
    ["29,5", 2950],
    ["10000", 1_000_000],
  ];
  it.each(PRICES)("price %s → %s", async (price, expected) => {
    const coach = await makeUser({ role: "coach" });
    const cookie = await signIn(coach.email);
    const plan = await createPlan(coach.id, {
      name: "Priced",
      sport: "bike",
      description: "",
      alignment: "start",
      date: "2027-01-04",
      weeks: 4,
      weeklyHours: 8,
      pattern: "3:1",
      testEveryWeeks: 6,
    });
    const res = await run(
      coachShop.action,
      formRequest(
        "/coach/shop",
        {
          intent: "create",
          planId: String(plan.id),
          title: "Priced plan",
          description: "A plan with a price.",
          level: "beginner",
          price,
          currency: "EUR",
        },
        { cookie },
      ),
    );
    const listing = await Listing.findOne({ where: { planId: plan.id } });
    if (typeof expected === "number") expect(listing!.priceCents).toBe(expected);
    else {
      expect(statusOf(res)).toBe(400);
      expect(messageOf(payloadOf(res), "price")).toMatch(expected);
      expect(listing).toBeNull();
    }
  });

  it("only the owner lists their plans", async () => {
    const coach = await makeUser({ role: "coach" });
    const other = await makeUser({ role: "coach" });
    const plan = await createPlan(other.id, {
      name: "Not mine",
      sport: "bike",
      description: "",
      alignment: "start",
      date: "2027-01-04",
      weeks: 4,
      weeklyHours: 8,
      pattern: "3:1",
      testEveryWeeks: 6,
    });
    const notMine = await run(
      coachShop.action,
      formRequest(
        "/coach/shop",
        {
          intent: "create",
          planId: String(plan.id),
          title: "Stolen",
          description: "Not my plan at all.",
          level: "beginner",
          price: "10",
          currency: "EUR",
        },
        { cookie: await signIn(coach.email) },
      ),
    );
    expect(statusOf(notMine)).toBe(404);
    expect(await Listing.count({ where: { planId: plan.id } })).toBe(0);
  });

  it("edits show the new price to the next buyer only; unpublish closes the shop window, republish opens it", async () => {
    const { listing, coachCookie, buyer, buyerCookie } = await shopScenario();
    await checkout(listing.slug, buyerCookie);
    const first = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    const edit = (fields: Record<string, string>, cookie = coachCookie) =>
      run(
        coachShop.action,
        formRequest(
          "/coach/shop",
          {
            intent: "edit",
            listingId: String(listing.id),
            title: "Winter base, revised",
            description: "Four weeks of steady work, revised.",
            level: "advanced",
            coverText: "Steady first",
            price: "59.00",
            ...fields,
          },
          { cookie },
        ),
      );
    const bad = await edit({ price: "0.001" });
    expect(statusOf(bad)).toBe(400);
    expect(messageOf(payloadOf(bad), "price")).toMatch(/two decimals/);
    expect(messageOf(payloadOf(bad))).toBe("Check the listing.");
    // Nothing was written on the bad price.
    expect((await Listing.findByPk(listing.id))!.title).toBe(listing.title);
    const stranger = await makeUser({ role: "coach" });
    expect(statusOf(await edit({}, await signIn(stranger.email)))).toBe(404);
    expect(payloadOf(await edit({})).status).toBe("success");
    await listing.reload();
    expect(listing).toMatchObject({
      title: "Winter base, revised",
      priceCents: 5900,
      coverText: "Steady first",
      level: "advanced",
    });
    // The first order's open checkout still charges what it was made at, and fulfils at that price.
    await pay(fake.sessions.get(first.checkoutSessionId!)!.url, { action: "pay", card: TEST_CARDS.success });
    await first.reload();
    expect(first).toMatchObject({ status: "fulfilled", amountCents: 4900, paidCents: 4900 });
    const next = await makeUser({ role: "athlete" });
    await checkout(listing.slug, await signIn(next.email));
    expect((await Order.findOne({ where: { buyerId: next.id } }))!.amountCents).toBe(5900);

    await run(
      coachShop.action,
      formRequest("/coach/shop", { intent: "unpublish", listingId: String(listing.id) }, { cookie: coachCookie }),
    );
    const closed = await run(
      listingPage.action,
      formRequest(
        `/shop/${listing.slug}`,
        { mode: "start", date: addDays(todayIn("UTC"), 7) },
        { cookie: buyerCookie },
      ),
      { slug: listing.slug },
    );
    expect(statusOf(closed)).toBe(404);
    expect(
      statusOf(await run(listingPage.loader, getRequest(`/shop/${listing.slug}`, buyerCookie), { slug: listing.slug })),
    ).toBe(404);
    await run(
      coachShop.action,
      formRequest("/coach/shop", { intent: "publish", listingId: String(listing.id) }, { cookie: coachCookie }),
    );
    // A bad date or no way of lining up: the message beside the field, and no order.
    const orders = await Order.count();
    const badCheckout = await run(
      listingPage.action,
      formRequest(`/shop/${listing.slug}`, { mode: "sideways", date: "soon" }, { cookie: buyerCookie }),
      { slug: listing.slug },
    );
    expect(statusOf(badCheckout)).toBe(400);
    expect(messageOf(payloadOf(badCheckout), "mode")).toBe("Choose how to line the plan up.");
    expect(messageOf(payloadOf(badCheckout), "date")).toBe("Choose a date.");
    expect(await Order.count()).toBe(orders);
    // The buyer already has this plan on those weeks, so they say how to place the second copy.
    await checkout(listing.slug, buyerCookie, undefined, { placement: "alongside" });
  });
});

/* ---------- before paying ---------- */

describe("what buying will do, shown before paying", () => {
  it("warns about a missing threshold and an overlapping plan, and makes the buyer choose", async () => {
    const { listing, coach, plan } = await shopScenario();
    const buyer = await makeUser({ role: "athlete", name: "No Threshold" });
    const cookie = await signIn(buyer.email);
    const page = payloadOf(
      await run(listingPage.loader, getRequest(`/shop/${listing.slug}`, cookie), { slug: listing.slug }),
    );
    expect(page.placement.missingThresholds).toEqual([{ sport: "bike", sessions: expect.any(Number) }]);
    expect(page.placement.missingThresholds[0].sessions).toBeGreaterThanOrEqual(4);
    expect(page.placement.current).toEqual([]);
    // The buyer's own coach already placed a plan on the same weeks.
    await CoachAthlete.create({ coachId: coach.id, athleteId: buyer.id });
    const start = addDays(todayIn("UTC"), 7);
    // The coach places it knowingly: the buyer has no bike threshold yet.
    const placed = await assignPlan(coach, plan.id, [buyer.id], {
      mode: "start",
      date: start,
      choice: { confirmSports: true },
    });
    const again = payloadOf(
      await run(listingPage.loader, getRequest(`/shop/${listing.slug}`, cookie), { slug: listing.slug }),
    );
    expect(again.placement.current).toHaveLength(1);
    const refused = await run(
      listingPage.action,
      formRequest(`/shop/${listing.slug}`, { mode: "start", date: start }, { cookie }),
      { slug: listing.slug },
    );
    expect(statusOf(refused)).toBe(400);
    // The message sits beside the placement choice; nothing is ordered.
    expect(messageOf(payloadOf(refused), "placement")).toMatch(/overlap “Sold plan”/);
    expect(await Order.count({ where: { buyerId: buyer.id } })).toBe(0);
    await checkout(listing.slug, cookie, start, { placement: "after" });
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    expect(order.alignDate).toBe(firstMondayAfter(again.placement.current));
    expect(order.alignDate > addDays(placed.start, 27)).toBe(true);
    await checkout(listing.slug, cookie, start, { placement: "alongside" });
    expect((await Order.findAll({ where: { buyerId: buyer.id, id: { [Op.ne]: order.id } } }))[0].alignDate).toBe(start);
  });
});
