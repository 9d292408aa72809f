import http from "node:http";
import net from "node:net";
import Stripe from "stripe";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { resetEnvCache } from "~/.server/env";
import { startFakePayments, TEST_CARDS } from "~/.server/fakes/payments";
import { CoachAthlete, Listing, OutboundEmail, Order, PaymentEvent, ScheduledBlock, ScheduledSession, Threshold } from "~/.server/models";
import { createPlan } from "~/.server/services/plans";
import { applyBoardOp } from "~/.server/services/board";
import { Session, SessionBlock, PlanWeek } from "~/.server/models";
import * as coachShop from "~/routes/coach/shop";
import * as listingPage from "~/routes/shop/listing";
import * as webhook from "~/routes/webhooks/payments";
import { addDays, todayIn } from "~/lib/dates";
import { formRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const SECRET = "whsec_test_integration";
let fake: Awaited<ReturnType<typeof startFakePayments>>;
let forwarder: http.Server;

const freePort = () =>
  new Promise<number>((r) => {
    const s = net.createServer().listen(0, "127.0.0.1", () => {
      const p = (s.address() as net.AddressInfo).port;
      s.close(() => r(p));
    });
  });

beforeAll(async () => {
  // The fake provider posts webhooks over HTTP; this forwarder hands them to the route's action as a Request.
  forwarder = http.createServer(async (req, res) => {
    let body = "";
    for await (const c of req) body += c;
    const r = (await webhook.action({ request: new Request("http://localhost:3999/webhooks/payments", { method: "POST", body, headers: { "stripe-signature": String(req.headers["stripe-signature"] ?? "") } }), params: {}, context: {} } as never)) as Response;
    res.writeHead(r.status, { "Content-Type": "application/json" }).end(await r.text());
  });
  await new Promise<void>((r) => forwarder.listen(0, "127.0.0.1", r));
  const port = await freePort();
  process.env.FAKE_PAYMENTS_PORT = String(port);
  process.env.STRIPE_WEBHOOK_SECRET = SECRET;
  resetEnvCache();
  fake = await startFakePayments({ port, webhookUrl: `http://127.0.0.1:${(forwarder.address() as net.AddressInfo).port}/`, webhookSecret: SECRET });
});
afterAll(async () => {
  await fake?.close();
  forwarder?.close();
});

async function shopScenario(price = "49.00") {
  const coach = await makeUser({ role: "coach", name: "Seller Coach" });
  const coachCookie = await signIn(coach.email);
  const plan = await createPlan(coach.id, { name: "Sold plan", sport: "bike", description: "", alignment: "start", date: "2027-01-04", weeks: 4, weeklyHours: 8, pattern: "3:1", testEveryWeeks: 6 });
  const s = await Session.create({ ownerId: coach.id, name: "Sweet spot", sport: "bike" });
  await SessionBlock.create({ sessionId: s.id, position: 0, kind: "steady", spec: { kind: "steady", durationS: 2400, target: { metric: "power", lowPct: 88, highPct: 92 } } });
  for (const w of await PlanWeek.findAll({ where: { planId: plan.id } })) await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId: s.id, toWeek: w.id, toDay: 3, toIndex: 0 });
  const created = await run(coachShop.action, formRequest("/coach/shop", { intent: "create", planId: String(plan.id), title: "Winter base block", description: "Four weeks of steady work.", level: "intermediate", price, currency: "EUR" }, { cookie: coachCookie }));
  expect(payloadOf(created).ok).toBe(true);
  const listing = (await Listing.findOne({ where: { planId: plan.id } }))!;
  await run(coachShop.action, formRequest("/coach/shop", { intent: "publish", listingId: String(listing.id) }, { cookie: coachCookie }));
  const buyer = await makeUser({ role: "athlete", name: "Buyer B" });
  await Threshold.create({ athleteId: buyer.id, sport: "bike", metric: "power", value: 240, unit: "W", effectiveFrom: "2026-01-01", source: "manual" });
  const buyerCookie = await signIn(buyer.email);
  return { coach, coachCookie, listing, buyer, buyerCookie };
}

async function checkout(slug: string, cookie: string, date = addDays(todayIn("UTC"), 7)) {
  const res = await run(listingPage.action, formRequest(`/shop/${slug}`, { mode: "start", date }, { cookie }), { slug });
  expect(statusOf(res)).toBe(302);
  const url = (res as Response).headers.get("location")!;
  expect(url).toMatch(/\/pay\/cs_test_/);
  return url;
}

const pay = (url: string, fields: Record<string, string>) => fetch(url, { method: "POST", body: new URLSearchParams(fields), redirect: "manual" });

describe("plan shop against the local payment provider", () => {
  it("a paid order lands on the buyer's calendar with their watts, and a receipt is queued", async () => {
    const { listing, buyer, buyerCookie } = await shopScenario();
    const url = await checkout(listing.slug, buyerCookie);
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    expect(order).toMatchObject({ status: "pending", amountCents: 4900, currency: "EUR" });
    const res = await pay(url, { action: "pay", card: TEST_CARDS.success });
    expect(res.status).toBe(303);
    expect(res.headers.get("location")).toMatch(new RegExp(`/shop/orders/${order.id}\\?session=cs_test_`));
    await order.reload();
    expect(order.status).toBe("fulfilled");
    const sessions = await ScheduledSession.findAll({ where: { athleteId: buyer.id } });
    expect(sessions.length).toBeGreaterThanOrEqual(4);
    const block = await ScheduledBlock.findOne({ where: { athleteId: buyer.id, metric: "power", lowPct: 88 } });
    expect(block).toMatchObject({ lowAbs: Math.round((88 * 240) / 100), highAbs: Math.round((92 * 240) / 100) });
    const receipt = await OutboundEmail.findOne({ where: { toAddress: buyer.email, template: "receipt" } });
    expect(receipt!.textBody).toContain("€49.00");
  });

  it("a declined card and a cancelled checkout leave a clear state and no sessions", async () => {
    const { listing, buyer, buyerCookie } = await shopScenario();
    const url = await checkout(listing.slug, buyerCookie);
    const declined = await pay(url, { action: "pay", card: TEST_CARDS.declined });
    expect(declined.status).toBe(200);
    expect(await declined.text()).toContain("declined");
    expect((await Order.findOne({ where: { buyerId: buyer.id } }))!.status).toBe("declined");
    const url2 = await checkout(listing.slug, buyerCookie);
    const cancelled = await pay(url2, { action: "cancel" });
    expect(cancelled.headers.get("location")).toMatch(/cancelled=1/);
    const orders = await Order.findAll({ where: { buyerId: buyer.id }, order: [["id", "ASC"]] });
    expect(orders.map((o) => o.status)).toEqual(["declined", "cancelled"]);
    expect(await ScheduledSession.count({ where: { athleteId: buyer.id } })).toBe(0);
  });

  it("a webhook delivered twice, or events out of order, never double or undo an order", async () => {
    const { listing, buyer, buyerCookie } = await shopScenario();
    const url = await checkout(listing.slug, buyerCookie);
    await pay(url, { action: "pay", card: TEST_CARDS.success });
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    const count = await ScheduledSession.count({ where: { athleteId: buyer.id } });
    const event = (await PaymentEvent.findOne({ where: { orderId: order.id, type: "checkout.session.completed" } }))!;
    const signer = new Stripe("sk_test_x");
    const replay = await webhook.action({ request: new Request("http://x/webhooks/payments", { method: "POST", body: event.payload, headers: { "stripe-signature": signer.webhooks.generateTestHeaderString({ payload: event.payload, secret: SECRET }) } }), params: {}, context: {} } as never);
    expect(await (replay as Response).json()).toMatchObject({ outcome: "duplicate" });
    // A late "expired" for the same session is ignored: the order stays fulfilled.
    const session = fake.sessions.get(order.checkoutSessionId!)!;
    await fake.deliver("checkout.session.expired", session).job;
    await order.reload();
    expect(order.status).toBe("fulfilled");
    expect(await ScheduledSession.count({ where: { athleteId: buyer.id } })).toBe(count);
  });

  it("a tampered signature gets 400 and changes nothing; an amount mismatch flags the order", async () => {
    const { listing, buyer, buyerCookie } = await shopScenario();
    await checkout(listing.slug, buyerCookie);
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    const session = fake.sessions.get(order.checkoutSessionId!)!;
    const payload = JSON.stringify({ id: "evt_forged", object: "event", type: "checkout.session.completed", data: { object: { ...session, amount_total: 4900, payment_status: "paid" } } });
    const forged = (await webhook.action({ request: new Request("http://x/webhooks/payments", { method: "POST", body: payload, headers: { "stripe-signature": "t=1,v1=deadbeef" } }), params: {}, context: {} } as never)) as Response;
    expect(forged.status).toBe(400);
    await order.reload();
    expect(order.status).toBe("pending");
    expect(await PaymentEvent.count({ where: { providerEventId: "evt_forged" } })).toBe(0);
    // The provider reports a different amount than the order: flagged, not fulfilled.
    await fake.deliver("checkout.session.completed", { ...session, amount_total: 100, payment_intent: "pi_odd" }).job;
    await order.reload();
    expect(order.status).toBe("flagged");
    expect(await ScheduledSession.count({ where: { athleteId: buyer.id } })).toBe(0);
  });

  it("a refund removes future sessions of the plan, keeps past ones, and is the seller's alone", async () => {
    const { listing, buyer, buyerCookie, coachCookie } = await shopScenario();
    const url = await checkout(listing.slug, buyerCookie, todayIn("UTC"));
    await pay(url, { action: "pay", card: TEST_CARDS.success });
    const order = (await Order.findOne({ where: { buyerId: buyer.id } }))!;
    expect(order.status).toBe("fulfilled");
    const stranger = await makeUser({ role: "coach" });
    const denied = await run(coachShop.action, formRequest("/coach/shop", { intent: "refund", orderId: String(order.id) }, { cookie: await signIn(stranger.email) }));
    expect(statusOf(denied)).toBe(404);
    const res = await run(coachShop.action, formRequest("/coach/shop", { intent: "refund", orderId: String(order.id) }, { cookie: coachCookie }));
    expect(payloadOf(res).ok).toBe(true);
    await order.reload();
    expect(order.status).toBe("refunded");
    const left = await ScheduledSession.findAll({ where: { athleteId: buyer.id } });
    expect(left.every((s) => s.status === "cancelled" || s.date < todayIn(buyer.timezone))).toBe(true);
    await fake.settle();
  });

  it("validates listings: price above 0, own plans only", async () => {
    const coach = await makeUser({ role: "coach" });
    const cookie = await signIn(coach.email);
    const other = await makeUser({ role: "coach" });
    const plan = await createPlan(other.id, { name: "Not mine", sport: "bike", description: "", alignment: "start", date: "2027-01-04", weeks: 4, weeklyHours: 8, pattern: "3:1", testEveryWeeks: 6 });
    const zero = await run(coachShop.action, formRequest("/coach/shop", { intent: "create", planId: String(plan.id), title: "Free", description: "Free plan here.", level: "beginner", price: "0", currency: "EUR" }, { cookie }));
    expect(payloadOf(zero).fieldErrors.price).toMatch(/more than 0/);
    const notMine = await run(coachShop.action, formRequest("/coach/shop", { intent: "create", planId: String(plan.id), title: "Stolen", description: "Not my plan at all.", level: "beginner", price: "10", currency: "EUR" }, { cookie }));
    expect(statusOf(notMine)).toBe(404);
    expect(await Listing.count({ where: { planId: plan.id } })).toBe(0);
    await CoachAthlete.count();
  });
});
