import type { Transaction } from "sequelize";
import { enqueueJob } from "../jobs";
import { Job, Order, type OrderStatus } from "../models";
import { formatPrice } from "~/lib/shop";

/*
 * THE ORDER STATE MACHINE
 *
 *   created ──paid──────────────▶ fulfilled ──refund (either side, full)──▶ refunded
 *      │  ▲                          ▲   │
 *      │  └─(retry on the same page)─┘   └──misfit──▶ needs review ──deliver──▶ fulfilled
 *      ├──card declined──▶ declined ──paid──▶ fulfilled          └──refund───▶ refunded
 *      ├──checkout expired / cancelled──▶ expired ──paid later──▶ needs review
 *      └──misfit (wrong amount, refund before any payment, …)──▶ needs review
 *
 * The provider's events do not arrive in order and may arrive twice, so an event never moves the order by itself.
 * Each event adds a *fact* to the order (paid amount and time, expiry time, declines, refunds by id, a reason for a
 * person to look), and the state is derived from all facts together by `deriveStatus`. Facts only ever grow, and
 * the same fact reported twice (a redelivered event, or the coach's refund and the provider's `charge.refunded`)
 * is absorbed, so any order and any duplication of the same events ends in the same state. Effects of entering a
 * state are follow-up jobs (see `app/.server/jobs.ts`), enqueued in the event's transaction under one key per order
 * and kind, and run by whichever instance claims them: the webhook only records the fact, moves the order and
 * answers. A follow-up re-reads the order under its row lock and acts only if the order is still in that state,
 * guarded by its own marks: sessions are placed once (`assignmentId`), the receipt and the refund notice are sent
 * once (`receiptSentAt`, `refundNoticeSentAt`). A follow-up that keeps failing puts the order in review.
 *
 * A reason for review sticks until a person resolves it (deliver, refund, or close when nothing was paid), except
 * that a full refund settles everything: the money is back with the buyer.
 */

export type OrderFacts = Pick<
  Order,
  "amountCents" | "paidCents" | "refundedCents" | "reviewReason" | "expiredAt" | "declinedCount"
>;

export function deriveStatus(f: OrderFacts): OrderStatus {
  if (f.paidCents !== null && f.paidCents > 0 && f.refundedCents >= f.paidCents) return "refunded";
  if (f.reviewReason) return "needs_review";
  if (f.paidCents !== null) return "fulfilled";
  if (f.expiredAt) return "expired";
  if (f.declinedCount > 0) return "declined";
  return "created";
}

export type Obj = {
  id?: string;
  object?: string;
  amount?: number;
  amount_total?: number;
  amount_received?: number;
  amount_refunded?: number;
  currency?: string;
  status?: string;
  payment_status?: string;
  metadata?: Record<string, string> | null;
  payment_intent?: string | { id: string } | null;
  refunds?: { data?: { id: string; amount: number; status?: string }[] };
};

export const idOf = (v: string | { id: string } | null | undefined) => (typeof v === "string" ? v : (v?.id ?? null));
export const when = (d: Date) => `${d.toISOString().slice(0, 16).replace("T", " ")} UTC`;
export const money = (cents: number | null | undefined, currency: string | null | undefined) =>
  cents == null ? "nothing" : formatPrice(cents, (currency ?? "EUR").toUpperCase());

/**
 * Every write that reads an order locks its row (FOR UPDATE on PostgreSQL; SQLite has a single writer), so events,
 * refunds and reviews of one order take turns across every app instance and each sees the last one's result.
 */
export const locked = (transaction: Transaction) => ({ transaction, lock: transaction.LOCK.UPDATE });

export interface Change {
  patch: Partial<Order>;
  outcome: string;
  review?: string;
}

/** One event → the facts it adds. Pure apart from reading the order. */
export function factsFrom(order: Order, type: string, o: Obj, at: Date): Change {
  const paid = (amount: number | undefined, currency: string | undefined, pi: string | null): Change => {
    if (order.paidCents !== null) {
      if (pi && order.paymentIntentId && pi !== order.paymentIntentId)
        return {
          patch: {},
          outcome: "review",
          review: `A second payment (${money(amount, currency)}, ${pi}) arrived for an order already paid with ${order.paymentIntentId}: the buyer may have paid twice.`,
        };
      return { patch: {}, outcome: "already-paid" };
    }
    const patch: Partial<Order> = {
      paidCents: amount ?? 0,
      paidCurrency: (currency ?? "").toUpperCase(),
      paidAt: at,
      paymentIntentId: pi ?? order.paymentIntentId,
    };
    if (amount !== order.amountCents || (currency ?? "").toUpperCase() !== order.currency)
      return {
        patch,
        outcome: "review",
        review: `Paid ${money(amount, currency)}, expected ${money(order.amountCents, order.currency)}.`,
      };
    // Ties in the provider's one-second clock go by arrival: an expiry already on record came first.
    if (order.expiredAt && order.expiredAt.getTime() <= at.getTime())
      return {
        patch,
        outcome: "review",
        review: `Paid after the checkout had expired or been cancelled (${when(order.expiredAt)}); the plan was not placed.`,
      };
    return { patch, outcome: "paid" };
  };
  const refunded = (
    entries: { id: string; amount: number; status?: string }[],
    cumulative: number | undefined,
  ): Change => {
    const refunds = { ...order.refunds };
    let failed: string | null = null;
    for (const r of entries) {
      if (r.status === "failed" || r.status === "canceled") {
        if (refunds[r.id] !== undefined) delete refunds[r.id];
        failed = r.id;
      } else if (r.status === undefined || r.status === "succeeded" || r.status === "pending") refunds[r.id] = r.amount;
    }
    const sum = Object.values(refunds).reduce((s, a) => s + a, 0);
    const total = Math.max(failed ? 0 : order.refundedCents, cumulative ?? 0, sum);
    const patch: Partial<Order> = { refunds, refundedCents: total };
    if (failed)
      return {
        patch,
        outcome: "review",
        review: `The provider reports that refund ${failed} failed; the buyer has not got the money back.`,
      };
    if (total === order.refundedCents && sum === Object.values(order.refunds).reduce((s, a) => s + a, 0))
      return { patch: {}, outcome: "already-refunded" };
    if (order.paidCents === null)
      return {
        patch,
        outcome: "review",
        review: `The provider reports a refund of ${money(total, order.currency)} before any payment is on record.`,
      };
    if (total < order.paidCents)
      return {
        patch,
        outcome: "review",
        review: `Partly refunded: ${money(total, order.currency)} of ${money(order.paidCents, order.paidCurrency)}.`,
      };
    return { patch, outcome: "refunded" };
  };

  switch (type) {
    case "checkout.session.completed":
      // Delayed payment methods complete the session unpaid; the money is confirmed by async_payment_succeeded.
      if (o.payment_status && o.payment_status !== "paid")
        return { patch: { checkoutSessionId: o.id ?? order.checkoutSessionId }, outcome: "awaiting-payment" };
      return paid(o.amount_total, o.currency, idOf(o.payment_intent));
    case "checkout.session.async_payment_succeeded":
      return paid(o.amount_total, o.currency, idOf(o.payment_intent));
    case "payment_intent.succeeded":
      return paid(o.amount_received ?? o.amount, o.currency, o.id ?? null);
    case "checkout.session.async_payment_failed":
    case "payment_intent.payment_failed":
      return {
        patch: { declinedCount: order.declinedCount + 1 },
        outcome: order.paidCents !== null ? "stale-decline" : "declined",
      };
    case "checkout.session.expired":
      if (order.expiredAt) return { patch: {}, outcome: "already-expired" };
      if (order.paidCents !== null && order.paidAt && at.getTime() < order.paidAt.getTime())
        return {
          patch: { expiredAt: at },
          outcome: "review",
          review: `Paid after the checkout had expired or been cancelled (${when(at)}); the plan was placed before the expiry arrived.`,
        };
      return { patch: { expiredAt: at }, outcome: order.paidCents !== null ? "stale-expiry" : "expired" };
    case "charge.refunded":
      return refunded(
        (o.refunds?.data ?? []).map((r) => ({ id: r.id, amount: r.amount, status: r.status })),
        o.amount_refunded,
      );
    case "refund.created":
    case "refund.updated":
    case "refund.failed":
    case "charge.refund.updated":
      return refunded(
        [
          {
            id: o.id ?? `refund-${at.getTime()}`,
            amount: o.amount ?? 0,
            status: type === "refund.failed" ? "failed" : o.status,
          },
        ],
        undefined,
      );
    case "charge.dispute.created":
      return {
        patch: {},
        outcome: "review",
        review: `The buyer disputed the payment (${money(o.amount, o.currency)}) with their bank.`,
      };
    default:
      return { patch: {}, outcome: "not-used" };
  }
}

/** Applies facts, derives the new state and enqueues the follow-ups of entering it — inside the caller's transaction. */
export async function settle(order: Order, change: Change, transaction: Transaction, note?: string) {
  const before = order.status;
  const patch: Partial<Order> = { ...change.patch };
  if (change.review && !order.reviewReason) patch.reviewReason = change.review;
  else if (change.review && order.reviewReason && !order.reviewReason.includes(change.review))
    patch.reviewReason = `${order.reviewReason} ${change.review}`;
  const facts = { ...order.get({ plain: true }), ...patch } as Order;
  const status = deriveStatus(facts);
  await order.update({ ...patch, status, ...(note ? { note } : {}) }, { transaction });
  const effects: string[] = [];
  const follow = async (kind: FollowUp, key: string = kind) => {
    await enqueueJob({ kind, key: `order:${order.id}:${key}`, orderId: order.id }, transaction);
    effects.push(`${kind} queued`);
  };
  if (status === "fulfilled" && !order.assignmentId) await follow("place");
  if (status === "refunded" && before !== "refunded") await follow("unplace");
  if (status === "needs_review" && before !== "needs_review") {
    // Each entry into review is told once; the order row is locked, so the count is this order's own.
    const told = await Job.count({ where: { orderId: order.id, kind: "review-notice" }, transaction });
    await follow("review-notice", `review-notice:${told + 1}`);
  }
  return { status, effects };
}

export type FollowUp = "place" | "unplace" | "review-notice";
