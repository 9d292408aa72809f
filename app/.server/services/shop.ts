import crypto from "node:crypto";
import { Op } from "sequelize";
import { z } from "zod";
import { writeTransaction } from "../db";
import { env } from "../env";
import { queueEmail } from "../mail";
import { Assignment, Listing, Order, PaymentEvent, PlanWeek, ScheduledBlock, ScheduledSession, SeasonPlan, Threshold, User } from "../models";
import { payments, verifyWebhook } from "../payments";
import { alignStart, materialize, resolveSteps } from "./materialize";
import { thresholdHistory, thresholdSport } from "./thresholds";
import { isIsoDate, todayIn } from "~/lib/dates";
import { defaultTestFor } from "~/lib/protocols";
import { CURRENCIES, LEVELS } from "~/lib/shop";

export class ShopError extends Error {
  name = "ShopError";
  constructor(
    message: string,
    readonly status = 400,
  ) {
    super(message);
  }
}

export { CURRENCIES, LEVELS };

export const listingSchema = z.object({
  planId: z.coerce.number().int().positive("Choose one of your plans."),
  title: z.string().trim().min(3, "Give the plan a title of at least 3 characters.").max(120),
  description: z.string().trim().min(10, "Describe the plan in a sentence or two.").max(4000),
  level: z.enum(LEVELS, { error: "Choose a level." }),
  price: z.coerce.number({ error: "Enter a price." }).gt(0, "The price must be more than 0.").max(10_000, "Keep the price under 10,000."),
  currency: z.enum(CURRENCIES, { error: "Choose a currency." }),
});

const slugify = (s: string) => s.toLowerCase().normalize("NFKD").replace(/[^\w\s-]/g, "").trim().replace(/[\s_-]+/g, "-").slice(0, 60) || "plan";

export async function createListing(coach: User, input: z.infer<typeof listingSchema>) {
  const plan = await SeasonPlan.findOne({ where: { id: input.planId, ownerId: coach.id } });
  if (!plan) throw new ShopError("That plan is not yours.", 404);
  const weeks = await PlanWeek.findAll({ where: { planId: plan.id } });
  const hours = weeks.reduce((s, w) => s + w.plannedHours, 0) / Math.max(1, weeks.length);
  return writeTransaction((transaction) =>
    Listing.create(
      {
        planId: plan.id,
        coachId: coach.id,
        slug: `${slugify(input.title)}-${crypto.randomBytes(3).toString("hex")}`,
        title: input.title,
        description: input.description,
        sport: plan.sport,
        level: input.level,
        weeks: weeks.length,
        weeklyHours: Math.round(hours * 10) / 10,
        priceCents: Math.round(input.price * 100),
        currency: input.currency,
      },
      { transaction },
    ),
  );
}

export async function setPublished(coach: User, listingId: number, published: boolean) {
  const [n] = await Listing.update({ published }, { where: { id: listingId, coachId: coach.id } });
  if (n !== 1) throw new ShopError("That listing is not yours.", 404);
}

export const formatPrice = (cents: number, currency: string) => new Intl.NumberFormat("en-GB", { style: "currency", currency }).format(cents / 100);

export async function publishedListings(filter: { sport?: string; maxWeeks?: number; maxHours?: number } = {}) {
  const where: Record<string, unknown> = { published: true };
  if (filter.sport) where.sport = filter.sport;
  if (filter.maxWeeks) where.weeks = { [Op.lte]: filter.maxWeeks };
  if (filter.maxHours) where.weeklyHours = { [Op.lte]: filter.maxHours };
  const rows = await Listing.findAll({ where, order: [["createdAt", "DESC"]] });
  const coaches = new Map((await User.findAll({ where: { id: [...new Set(rows.map((r) => r.coachId))] } })).map((u) => [u.id, u.name]));
  return rows.map((l) => ({ id: l.id, slug: l.slug, title: l.title, description: l.description, sport: l.sport, level: l.level, weeks: l.weeks, weeklyHours: l.weeklyHours, price: formatPrice(l.priceCents, l.currency), coach: coaches.get(l.coachId) ?? "" }));
}

/** Creates the pending order and the provider's checkout session; returns where to send the buyer. */
export async function startCheckout(buyer: User, listing: Listing, align: { mode: "start" | "event"; date: string }) {
  if (buyer.role !== "athlete") throw new ShopError("Plans are bought with an athlete account.", 403);
  if (!listing.published) throw new ShopError("This plan is not for sale right now.", 404);
  if (!isIsoDate(align.date)) throw new ShopError("Choose a date.");
  if (align.mode === "start" && align.date < todayIn(buyer.timezone)) throw new ShopError("Choose a start date from today on.");
  const order = await writeTransaction((transaction) =>
    Order.create({ listingId: listing.id, buyerId: buyer.id, amountCents: listing.priceCents, currency: listing.currency, alignMode: align.mode, alignDate: align.date }, { transaction }),
  );
  const base = env().appUrl;
  try {
    const session = await payments().checkout.sessions.create({
      mode: "payment",
      line_items: [{ quantity: 1, price_data: { currency: listing.currency.toLowerCase(), unit_amount: listing.priceCents, product_data: { name: listing.title } } }],
      metadata: { orderId: String(order.id) },
      client_reference_id: String(order.id),
      customer_email: buyer.email,
      success_url: `${base}/shop/orders/${order.id}?session={CHECKOUT_SESSION_ID}`,
      cancel_url: `${base}/shop/orders/${order.id}?cancelled=1`,
    });
    await order.update({ checkoutSessionId: session.id });
    return { order, url: session.url! };
  } catch (err) {
    await order.update({ status: "cancelled", note: `The payment provider could not be reached: ${(err as Error).message}` });
    throw new ShopError("The payment provider could not be reached. Nothing was charged; try again in a moment.", 502);
  }
}

type EventObject = { id?: string; amount_total?: number; currency?: string; metadata?: Record<string, string>; payment_intent?: string | null };

/**
 * Handles one verified webhook event. Recording the event id first (unique) makes a replay a no-op; a paid session
 * is checked against the order's amount and currency, then — in one transaction — the order is marked fulfilled,
 * the plan placed on the buyer's calendar and the receipt queued. Events arriving late or out of order only ever
 * move an order forward from "pending".
 */
export async function handlePaymentEvent(rawBody: string, signature: string | null) {
  let event;
  try {
    event = verifyWebhook(rawBody, signature);
  } catch {
    throw new ShopError("Webhook signature does not match.", 400);
  }
  const object = event.data.object as EventObject;
  const orderId = Number(object.metadata?.orderId);
  return writeTransaction(async (transaction) => {
    const seen = await PaymentEvent.findOne({ where: { providerEventId: event.id }, transaction });
    if (seen) return { outcome: "duplicate" };
    const order = Number.isInteger(orderId) && orderId > 0 ? await Order.findByPk(orderId, { transaction }) : null;
    let outcome = "ignored";
    if (order && event.type === "checkout.session.completed" && order.status === "pending") {
      if (object.amount_total !== order.amountCents || (object.currency ?? "").toUpperCase() !== order.currency) {
        await order.update({ status: "flagged", note: `Paid ${object.amount_total} ${object.currency}, expected ${order.amountCents} ${order.currency}.`, paymentIntentId: object.payment_intent ?? null }, { transaction });
        outcome = "flagged";
      } else {
        await fulfil(order, object.payment_intent ?? null, transaction);
        outcome = "fulfilled";
      }
    } else if (order && event.type === "checkout.session.async_payment_failed" && order.status === "pending") {
      await order.update({ status: "declined", note: "The card was declined." }, { transaction });
      outcome = "declined";
    } else if (order && event.type === "checkout.session.expired" && order.status === "pending") {
      await order.update({ status: "cancelled", note: "The buyer cancelled at checkout." }, { transaction });
      outcome = "cancelled";
    }
    await PaymentEvent.create({ providerEventId: event.id, type: event.type, orderId: order?.id ?? null, outcome, payload: rawBody.slice(0, 20_000) }, { transaction });
    return { outcome };
  });
}

async function fulfil(order: Order, paymentIntent: string | null, transaction: import("sequelize").Transaction) {
  const listing = (await Listing.findByPk(order.listingId, { transaction }))!;
  const buyer = (await User.findByPk(order.buyerId, { transaction }))!;
  const coach = await User.findByPk(listing.coachId, { transaction });
  const weeks = await PlanWeek.count({ where: { planId: listing.planId }, transaction });
  const start = alignStart(order.alignMode, order.alignDate, weeks);
  const assignment = await materialize(listing.planId, buyer, start, { assignedBy: null, transaction });
  // Without a threshold for the plan's sport, the buyer's first session is a field test, unless the plan starts with one.
  const plan = (await SeasonPlan.findByPk(listing.planId, { transaction }))!;
  const tsport = thresholdSport(plan.sport);
  const hasThreshold = tsport ? (await Threshold.count({ where: { athleteId: buyer.id, sport: tsport }, transaction })) > 0 : true;
  let testNote = "";
  if (!hasThreshold) {
    const weekOne = await ScheduledSession.findOne({ where: { assignmentId: assignment.id, testProtocol: { [Op.ne]: null }, date: { [Op.lt]: new Date(Date.parse(`${start}T00:00:00Z`) + 7 * 86_400_000).toISOString().slice(0, 10) } }, transaction });
    if (!weekOne) {
      const test = defaultTestFor(plan.sport);
      const session = await ScheduledSession.create({ athleteId: buyer.id, assignmentId: assignment.id, date: start, name: test.session!.name, sport: plan.sport === "multi" ? "bike" : plan.sport, testProtocol: test.key, plannedDurationS: test.session!.blocks.reduce((s, b) => s + ("durationS" in b ? b.durationS : 0), 0) }, { transaction });
      const rows = resolveSteps(test.session!.blocks, { athleteId: buyer.id, date: start, sport: session.sport, history: await thresholdHistory(buyer.id, transaction) });
      await ScheduledBlock.bulkCreate(rows.map((r) => ({ ...r, scheduledSessionId: session.id })), { transaction });
    }
    testNote = "You have no threshold yet, so week 1 starts with a field test; after it, every target turns into your own numbers.";
  }
  const sessions = await ScheduledSession.count({ where: { assignmentId: assignment.id }, transaction });
  await order.update({ status: "fulfilled", paymentIntentId: paymentIntent, assignmentId: assignment.id }, { transaction });
  await queueEmail(
    {
      to: buyer.email,
      template: "receipt",
      vars: { name: buyer.name, title: listing.title, coachName: coach?.name ?? "your coach", amount: formatPrice(order.amountCents, order.currency), orderId: `#${order.id}`, startDate: start, sessions, testNote, link: `${env().appUrl}/athlete/calendar` },
    },
    transaction,
  );
}

/** Refunds through the provider, then removes the buyer's future planned sessions of that plan (past ones stay). */
export async function refundOrder(by: User, orderId: number) {
  const order = await Order.findByPk(orderId);
  const listing = order ? await Listing.findByPk(order.listingId) : null;
  if (!order || !listing || (by.role !== "admin" && listing.coachId !== by.id)) throw new ShopError("No such order among your sales.", 404);
  if (order.status !== "fulfilled") throw new ShopError("Only fulfilled orders can be refunded.");
  if (!order.paymentIntentId) throw new ShopError("This order has no payment to refund.");
  await payments().refunds.create({ payment_intent: order.paymentIntentId });
  const buyer = (await User.findByPk(order.buyerId))!;
  const today = todayIn(buyer.timezone);
  return writeTransaction(async (transaction) => {
    await order.update({ status: "refunded", note: `Refunded by ${by.name}.` }, { transaction });
    const future = await ScheduledSession.findAll({ where: { assignmentId: order.assignmentId, status: "planned", date: { [Op.gte]: today } }, transaction });
    for (const s of future) await s.update({ status: "cancelled", cancelledAt: new Date(), feedSequence: s.feedSequence + 1 }, { transaction });
    // Detached from the plan, so a later "push changes" cannot bring the sessions back.
    if (order.assignmentId) await Assignment.update({ planId: null }, { where: { id: order.assignmentId }, transaction });
    return future.length;
  });
}

export async function salesFor(coach: User) {
  const listings = await Listing.findAll({ where: coach.role === "admin" ? {} : { coachId: coach.id } });
  const orders = listings.length ? await Order.findAll({ where: { listingId: listings.map((l) => l.id) }, order: [["createdAt", "DESC"]] }) : [];
  const buyers = new Map((await User.findAll({ where: { id: [...new Set(orders.map((o) => o.buyerId))] } })).map((u) => [u.id, u]));
  const title = new Map(listings.map((l) => [l.id, l.title]));
  return orders.map((o) => ({ id: o.id, listing: title.get(o.listingId) ?? "", buyer: buyers.get(o.buyerId)?.name ?? "", buyerEmail: buyers.get(o.buyerId)?.email ?? "", status: o.status, amountCents: o.amountCents, currency: o.currency, amount: formatPrice(o.amountCents, o.currency), date: o.createdAt.toISOString().slice(0, 10), note: o.note }));
}
