import crypto from "node:crypto";
import { Op } from "sequelize";
import { z } from "zod";
import { writeTransaction } from "../db";
import { env } from "../env";
import { Listing, Order, PlanWeek, SeasonPlan, User } from "../models";
import { payments, verifyWebhook } from "../payments";
import { refundByPerson } from "./order-review";
import { applyProviderEvent } from "./order-webhook";
import { isIsoDate, todayIn } from "~/lib/dates";
import {
  CURRENCIES,
  formatPrice,
  LEVELS,
  ORDER_STATUS_LABELS,
  type InCents,
  type listingEditSchema,
  type listingSchema,
} from "~/lib/shop";
import { DomainError } from "../errors";

export { CURRENCIES, LEVELS };

const slugify = (s: string) =>
  s
    .toLowerCase()
    .normalize("NFKD")
    .replace(/[^\w\s-]/g, "")
    .trim()
    .replace(/[\s_-]+/g, "-")
    .slice(0, 60) || "plan";

export async function createListing(coach: User, input: InCents<z.output<typeof listingSchema>>) {
  const plan = await SeasonPlan.findOne({ where: { id: input.planId, ownerId: coach.id } });
  if (!plan) throw new DomainError("not_found", "That plan is not yours.");
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
        priceCents: input.priceCents,
        currency: input.currency,
        coverText: input.coverText,
      },
      { transaction },
    ),
  );
}

export async function setPublished(coach: User, listingId: number, published: boolean) {
  const [n] = await Listing.update({ published }, { where: { id: listingId, coachId: coach.id } });
  if (n !== 1) throw new DomainError("not_found", "That listing is not yours.");
}

/**
 * Changes what the next buyer sees. Orders already made keep the amount they were created with (the order row
 * holds its own amountCents, and a checkout already open charges that amount).
 */
export async function updateListing(coach: User, input: InCents<z.output<typeof listingEditSchema>>) {
  return writeTransaction(async (transaction) => {
    const listing = await Listing.findOne({ where: { id: input.listingId, coachId: coach.id }, transaction });
    if (!listing) throw new DomainError("not_found", "That listing is not yours.");
    await listing.update(
      {
        title: input.title,
        description: input.description,
        coverText: input.coverText,
        level: input.level,
        priceCents: input.priceCents,
      },
      { transaction },
    );
    return listing;
  });
}

export { formatPrice };

export async function publishedListings(filter: { sport?: string; maxWeeks?: number; maxHours?: number } = {}) {
  const where: Record<string, unknown> = { published: true };
  if (filter.sport) where.sport = filter.sport;
  if (filter.maxWeeks) where.weeks = { [Op.lte]: filter.maxWeeks };
  if (filter.maxHours) where.weeklyHours = { [Op.lte]: filter.maxHours };
  const rows = await Listing.findAll({ where, order: [["createdAt", "DESC"]] });
  const coaches = new Map(
    (await User.findAll({ where: { id: [...new Set(rows.map((r) => r.coachId))] } })).map((u) => [u.id, u.name]),
  );
  return rows.map((l) => ({
    id: l.id,
    slug: l.slug,
    title: l.title,
    coverText: l.coverText,
    description: l.description,
    sport: l.sport,
    level: l.level,
    weeks: l.weeks,
    weeklyHours: l.weeklyHours,
    price: formatPrice(l.priceCents, l.currency),
    coach: coaches.get(l.coachId) ?? "",
  }));
}

/** Creates the pending order and the provider's checkout session; returns where to send the buyer. */
export async function startCheckout(
  buyer: User,
  listing: Listing,
  align: { mode: "start" | "event"; date: string },
  requestOrigin?: string,
) {
  if (buyer.role !== "athlete") throw new DomainError("forbidden", "Plans are bought with an athlete account.");
  if (!listing.published) throw new DomainError("not_found", "This plan is not for sale right now.");
  if (!isIsoDate(align.date)) throw new DomainError("invalid", "Choose a date.");
  if (align.mode === "start" && align.date < todayIn(buyer.timezone))
    throw new DomainError("invalid", "Choose a start date from today on.");
  const order = await writeTransaction((transaction) =>
    Order.create(
      {
        listingId: listing.id,
        buyerId: buyer.id,
        amountCents: listing.priceCents,
        currency: listing.currency,
        alignMode: align.mode,
        alignDate: align.date,
        returnOrigin: returnOrigin(requestOrigin),
      },
      { transaction },
    ),
  );
  // Back to the host name the buyer is signed in on, so their cookie comes along; unknown hosts get APP_URL.
  const base = returnOrigin(requestOrigin);
  try {
    const session = await payments().checkout.sessions.create({
      mode: "payment",
      line_items: [
        {
          quantity: 1,
          price_data: {
            currency: listing.currency.toLowerCase(),
            unit_amount: listing.priceCents,
            product_data: { name: listing.title },
          },
        },
      ],
      metadata: { orderId: String(order.id) },
      // Payment-intent and charge events then name the order too, whatever order they arrive in.
      payment_intent_data: { metadata: { orderId: String(order.id) } },
      client_reference_id: String(order.id),
      customer_email: buyer.email,
      success_url: `${base}/shop/orders/${order.id}?session={CHECKOUT_SESSION_ID}`,
      cancel_url: `${base}/shop/orders/${order.id}?cancelled=1`,
    });
    await order.update({ checkoutSessionId: session.id });
    return { order, url: session.url! };
  } catch (err) {
    await order.update({
      status: "expired",
      expiredAt: new Date(),
      note: `The payment provider could not be reached: ${(err as Error).message}`,
    });
    throw new DomainError(
      "upstream",
      "The payment provider could not be reached. Nothing was charged; try again in a moment.",
    );
  }
}

/** Verifies a webhook's signature on the raw body, then hands the event to the order state machine. */
export async function handlePaymentEvent(rawBody: string, signature: string | null) {
  let event;
  try {
    event = verifyWebhook(rawBody, signature);
  } catch {
    throw new DomainError("invalid", "Webhook signature does not match.");
  }
  return applyProviderEvent(event as never, rawBody);
}

/** The coach's (or an admin's) refund; a second click, or the provider's own refund event, changes nothing more. */
export async function refundOrder(by: User, orderId: number) {
  return refundByPerson(by, orderId);
}

/**
 * Origins a buyer may be sent back to: APP_URL's, and the address the server is bound to (with its loopback
 * aliases, since localhost and 127.0.0.1 are the same machine but different cookie jars).
 */
export function allowedOrigins(): Set<string> {
  const e = env();
  const out = new Set<string>([new URL(e.appUrl).origin]);
  const host = process.env.HOST ?? "127.0.0.1";
  const hosts = ["127.0.0.1", "localhost", "0.0.0.0", "::1", "::"].includes(host)
    ? ["127.0.0.1", "localhost", "[::1]"]
    : [host];
  for (const h of hosts) out.add(`http://${h}:${e.port}`);
  return out;
}

export function returnOrigin(requestOrigin?: string | null): string {
  if (requestOrigin && allowedOrigins().has(requestOrigin)) return requestOrigin;
  return env().appUrl;
}

export async function salesFor(coach: User) {
  const listings = await Listing.findAll({ where: coach.role === "admin" ? {} : { coachId: coach.id } });
  const orders = listings.length
    ? await Order.findAll({ where: { listingId: listings.map((l) => l.id) }, order: [["createdAt", "DESC"]] })
    : [];
  const buyers = new Map(
    (await User.findAll({ where: { id: [...new Set(orders.map((o) => o.buyerId))] } })).map((u) => [u.id, u]),
  );
  const title = new Map(listings.map((l) => [l.id, l.title]));
  return orders.map((o) => ({
    id: o.id,
    listing: title.get(o.listingId) ?? "",
    buyer: buyers.get(o.buyerId)?.name ?? "",
    buyerEmail: buyers.get(o.buyerId)?.email ?? "",
    status: o.status,
    label: ORDER_STATUS_LABELS[o.status] ?? o.status,
    amountCents: o.amountCents,
    paidCents: o.paidCents,
    refundedCents: o.refundedCents,
    currency: o.currency,
    amount: formatPrice(o.amountCents, o.currency),
    date: o.createdAt.toISOString().slice(0, 10),
    note:
      o.reviewReason && o.status === "needs_review"
        ? o.reviewReason
        : (o.note ??
          (o.status === "fulfilled" && o.declinedCount
            ? `Paid after ${o.declinedCount} declined card${o.declinedCount === 1 ? "" : "s"}.`
            : null)),
  }));
}
