import { Op, UniqueConstraintError, type Transaction } from "sequelize";
import { writeTransaction } from "../db";
import { env } from "../env";
import { enqueueJob, runDueJobs, type JobHandlers } from "../jobs";
import { queueEmail } from "../mail";
import {
  Assignment,
  Job,
  Listing,
  Order,
  PaymentEvent,
  PlanWeek,
  ScheduledBlock,
  ScheduledSession,
  SeasonPlan,
  Threshold,
  User,
  type OrderStatus,
} from "../models";
import { payments } from "../payments";
import { alignStart, materialize, resolveSteps } from "./materialize";
import { thresholdHistory, thresholdSport } from "./thresholds";
import { addDays, todayIn } from "~/lib/dates";
import { defaultTestFor } from "~/lib/protocols";
import { formatPrice } from "~/lib/shop";
import { DomainError } from "../errors";
import { orderRole } from "../access";

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

/** Every provider event type the checkout flow listens to; the README lists them too. */
export const HANDLED_EVENTS = [
  "checkout.session.completed",
  "checkout.session.async_payment_succeeded",
  "checkout.session.async_payment_failed",
  "checkout.session.expired",
  "payment_intent.succeeded",
  "payment_intent.payment_failed",
  "charge.refunded",
  "charge.refund.updated",
  "refund.created",
  "refund.updated",
  "refund.failed",
  "charge.dispute.created",
] as const;

type Obj = {
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

const idOf = (v: string | { id: string } | null | undefined) => (typeof v === "string" ? v : (v?.id ?? null));
const when = (d: Date) => `${d.toISOString().slice(0, 16).replace("T", " ")} UTC`;
const money = (cents: number | null | undefined, currency: string | null | undefined) =>
  cents == null ? "nothing" : formatPrice(cents, (currency ?? "EUR").toUpperCase());

/**
 * Every write that reads an order locks its row (FOR UPDATE on PostgreSQL; SQLite has a single writer), so events,
 * refunds and reviews of one order take turns across every app instance and each sees the last one's result.
 */
const locked = (transaction: Transaction) => ({ transaction, lock: transaction.LOCK.UPDATE });

async function findOrder(type: string, o: Obj, transaction: Transaction) {
  const byMeta = Number(o.metadata?.orderId);
  if (Number.isInteger(byMeta) && byMeta > 0) {
    const order = await Order.findByPk(byMeta, locked(transaction));
    if (order) return order;
  }
  if (type.startsWith("checkout.session.") && o.id) {
    const order = await Order.findOne({ where: { checkoutSessionId: o.id }, ...locked(transaction) });
    if (order) return order;
  }
  const pi = type.startsWith("payment_intent.") ? (o.id ?? null) : idOf(o.payment_intent);
  return pi ? Order.findOne({ where: { paymentIntentId: pi }, ...locked(transaction) }) : null;
}

interface Change {
  patch: Partial<Order>;
  outcome: string;
  review?: string;
}

/** One event → the facts it adds. Pure apart from reading the order. */
function factsFrom(order: Order, type: string, o: Obj, at: Date): Change {
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
async function settle(order: Order, change: Change, transaction: Transaction, note?: string) {
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

type FollowUp = "place" | "unplace" | "review-notice";

/** The order's follow-ups: each re-reads the order under its lock and acts only if it is still in that state. */
export const ORDER_FOLLOW_UPS: JobHandlers = {
  place: {
    async run(job, transaction) {
      const order = await Order.findByPk(job.orderId!, locked(transaction));
      if (order?.status === "fulfilled" && !order.assignmentId) await place(order, transaction);
    },
    giveUp: (job, error) =>
      putInReview(
        job.orderId!,
        `Placing the plan on the buyer's calendar failed ${job.attempts} times (${error}). Deliver it again or refund.`,
      ),
  },
  unplace: {
    async run(job, transaction) {
      const order = await Order.findByPk(job.orderId!, locked(transaction));
      if (order?.status === "refunded") await unplace(order, transaction);
    },
    giveUp: (job, error) =>
      putInReview(
        job.orderId!,
        `Taking the refunded sessions off the buyer's calendar failed ${job.attempts} times (${error}).`,
      ),
  },
  "review-notice": {
    async run(job, transaction) {
      const order = await Order.findByPk(job.orderId!, locked(transaction));
      if (order?.status === "needs_review") await tellSeller(order, transaction);
    },
  },
};

/** What a person sees when a follow-up gave up: the reason on the order (in review unless refunded) and its note. */
async function putInReview(orderId: number, reason: string) {
  await writeTransaction(async (transaction) => {
    const order = await Order.findByPk(orderId, locked(transaction));
    if (order) await settle(order, { patch: {}, outcome: "follow-up failed", review: reason }, transaction, reason);
  });
}

/** Runs the order follow-ups that are due now (all orders, or one); the app's runner does this in the background. */
export const runOrderFollowUps = (opts: { orderId?: number } = {}) => runDueJobs(ORDER_FOLLOW_UPS, opts);

/** Handles one verified provider event. Recording the event id (unique) first makes a redelivery a no-op. */
export async function applyProviderEvent(
  event: { id: string; type: string; created?: number; data: { object: unknown } },
  rawBody: string,
) {
  const o = (event.data?.object ?? {}) as Obj;
  const at = new Date((event.created ?? Math.floor(Date.now() / 1000)) * 1000);
  try {
    return await recordProviderEvent(event, o, at, rawBody);
  } catch (err) {
    // The same event delivered to two instances at once: both found it unseen, the order's lock made them take
    // turns, and the second one's insert of the event id failed. The first applied it; this one changed nothing.
    if (
      err instanceof UniqueConstraintError &&
      (await PaymentEvent.count({ where: { providerEventId: event.id } })) > 0
    )
      return { outcome: "duplicate", status: null as OrderStatus | null };
    throw err;
  }
}

async function recordProviderEvent(event: { id: string; type: string }, o: Obj, at: Date, rawBody: string) {
  return writeTransaction(async (transaction) => {
    const seen = await PaymentEvent.findOne({ where: { providerEventId: event.id }, transaction });
    if (seen) return { outcome: "duplicate", status: null as OrderStatus | null };
    const order = await findOrder(event.type, o, transaction);
    let outcome = order ? "not-used" : "no-order";
    let status: OrderStatus | null = null;
    if (order) {
      let change = factsFrom(order, event.type, o, at);
      const newPayment =
        change.patch.paymentIntentId && change.patch.paymentIntentId !== order.paymentIntentId
          ? change.patch.paymentIntentId
          : null;
      if (newPayment) change = await withWaiting(order, change, newPayment, transaction);
      outcome = change.outcome;
      status = (await settle(order, change, transaction)).status;
      await PaymentEvent.create(
        { providerEventId: event.id, type: event.type, orderId: order.id, outcome, payload: rawBody.slice(0, 20_000) },
        { transaction },
      );
      return { outcome, status };
    }
    // Kept, not dropped: a refund or charge event may name only a payment the order learns about later.
    await PaymentEvent.create(
      { providerEventId: event.id, type: event.type, orderId: null, outcome, payload: rawBody.slice(0, 20_000) },
      { transaction },
    );
    return { outcome, status };
  });
}

/**
 * Once an order learns its payment id, events that arrived earlier naming only that payment (a refund delivered
 * before the payment it refunds) join this change in the provider's order, so the effects run once, on the
 * combined facts, as if the events had arrived in turn.
 */
async function withWaiting(order: Order, change: Change, pi: string, transaction: Transaction): Promise<Change> {
  const waiting = await PaymentEvent.findAll({
    where: { orderId: null, outcome: "no-order", payload: { [Op.like]: `%${pi.replace(/[%\\]/g, "")}%` } },
    transaction,
  });
  const events = waiting
    .map((row) => ({
      row,
      event: JSON.parse(row.payload) as { type: string; created?: number; data: { object: Obj } },
    }))
    .filter(
      ({ event }) =>
        idOf(event.data.object.payment_intent) === pi ||
        (event.type.startsWith("payment_intent.") && event.data.object.id === pi),
    )
    .sort((a, b) => (a.event.created ?? 0) - (b.event.created ?? 0));
  if (!events.length) return change;
  const patch = { ...change.patch };
  const reviews = change.review ? [change.review] : [];
  order.set(change.patch);
  for (const { row, event } of events) {
    const late = factsFrom(order, event.type, event.data.object, new Date((event.created ?? 0) * 1000));
    order.set(late.patch);
    Object.assign(patch, late.patch);
    if (late.review) reviews.push(late.review);
    await row.update({ orderId: order.id, outcome: `${late.outcome} (applied late)` }, { transaction });
  }
  return { patch, outcome: `${change.outcome}+${events.length} waiting`, review: reviews.join(" ") || undefined };
}

async function place(order: Order, transaction: Transaction): Promise<string[]> {
  const listing = (await Listing.findByPk(order.listingId, { transaction }))!;
  const buyer = (await User.findByPk(order.buyerId, { transaction }))!;
  const coach = await User.findByPk(listing.coachId, { transaction });
  const weeks = await PlanWeek.count({ where: { planId: listing.planId }, transaction });
  const start = alignStart(order.alignMode, order.alignDate, weeks);
  const assignment = await materialize(listing.planId, buyer, start, { assignedBy: null, transaction });
  // Without a threshold for the plan's sport, the buyer's first session is a field test, unless the plan starts with one.
  const plan = (await SeasonPlan.findByPk(listing.planId, { transaction }))!;
  const tsport = thresholdSport(plan.sport);
  const hasThreshold = tsport
    ? (await Threshold.count({ where: { athleteId: buyer.id, sport: tsport }, transaction })) > 0
    : true;
  let testNote = "";
  if (!hasThreshold) {
    const weekOne = await ScheduledSession.findOne({
      where: { assignmentId: assignment.id, testProtocol: { [Op.ne]: null }, date: { [Op.lt]: addDays(start, 7) } },
      transaction,
    });
    if (!weekOne) {
      const test = defaultTestFor(plan.sport);
      const session = await ScheduledSession.create(
        {
          athleteId: buyer.id,
          assignmentId: assignment.id,
          date: start,
          name: test.session!.name,
          sport: plan.sport === "multi" ? "bike" : plan.sport,
          testProtocol: test.key,
          plannedDurationS: test.session!.blocks.reduce((s, b) => s + ("durationS" in b ? b.durationS : 0), 0),
        },
        { transaction },
      );
      const rows = resolveSteps(test.session!.blocks, {
        athleteId: buyer.id,
        date: start,
        sport: session.sport,
        history: await thresholdHistory(buyer.id, transaction),
      });
      await ScheduledBlock.bulkCreate(
        rows.map((r) => ({ ...r, scheduledSessionId: session.id })),
        { transaction },
      );
    }
    testNote =
      "You have no threshold yet, so week 1 starts with a field test; after it, every target turns into your own numbers.";
  }
  const sessions = await ScheduledSession.count({ where: { assignmentId: assignment.id }, transaction });
  await order.update({ assignmentId: assignment.id }, { transaction });
  if (order.receiptSentAt) return ["placed"];
  await queueEmail(
    {
      to: buyer.email,
      template: "receipt",
      vars: {
        name: buyer.name,
        title: listing.title,
        coachName: coach?.name ?? "your coach",
        amount: formatPrice(order.paidCents ?? order.amountCents, order.paidCurrency ?? order.currency),
        orderId: `#${order.id}`,
        startDate: start,
        sessions,
        testNote,
        link: `${order.returnOrigin ?? env().appUrl}/athlete/calendar`,
      },
    },
    transaction,
  );
  await order.update({ receiptSentAt: new Date() }, { transaction });
  return ["placed", "receipt"];
}

/** Removes the buyer's future planned sessions of this order (past, done and skipped ones stay) and tells them. */
async function unplace(order: Order, transaction: Transaction): Promise<string[]> {
  const buyer = (await User.findByPk(order.buyerId, { transaction }))!;
  let removed = 0;
  if (order.assignmentId) {
    const today = todayIn(buyer.timezone);
    const future = await ScheduledSession.findAll({
      where: { assignmentId: order.assignmentId, status: "planned", date: { [Op.gte]: today } },
      transaction,
    });
    for (const s of future)
      await s.update(
        { status: "cancelled", cancelledAt: new Date(), feedSequence: s.feedSequence + 1 },
        { transaction },
      );
    removed = future.length;
    // Detached from the plan, so a later "push changes" cannot bring the sessions back.
    await Assignment.update({ planId: null }, { where: { id: order.assignmentId }, transaction });
  }
  if (order.refundNoticeSentAt) return removed ? [`removed ${removed}`] : [];
  const listing = await Listing.findByPk(order.listingId, { transaction });
  const coach = listing ? await User.findByPk(listing.coachId, { transaction }) : null;
  await queueEmail(
    {
      to: buyer.email,
      template: "refund-notice",
      vars: {
        name: buyer.name,
        title: listing?.title ?? "your plan",
        coachName: coach?.name ?? "your coach",
        amount: formatPrice(order.refundedCents, order.paidCurrency ?? order.currency),
        orderId: `#${order.id}`,
        removed: removed
          ? `${removed} upcoming session${removed === 1 ? " was" : "s were"} taken off your calendar.`
          : "No sessions of this order were on your calendar.",
        link: `${order.returnOrigin ?? env().appUrl}/athlete/calendar`,
      },
    },
    transaction,
  );
  await order.update({ refundNoticeSentAt: new Date() }, { transaction });
  return [`removed ${removed}`, "refund-notice"];
}

async function tellSeller(order: Order, transaction: Transaction): Promise<string[]> {
  const listing = await Listing.findByPk(order.listingId, { transaction });
  const coach = listing ? await User.findByPk(listing.coachId, { transaction }) : null;
  const buyer = await User.findByPk(order.buyerId, { transaction });
  if (!coach || !listing) return [];
  await queueEmail(
    {
      to: coach.email,
      template: "order-review",
      vars: {
        name: coach.name,
        title: listing.title,
        orderId: `#${order.id}`,
        buyer: buyer ? `${buyer.name} <${buyer.email}>` : "unknown",
        reason: order.reviewReason ?? "",
        link: `${env().appUrl}/coach/shop#needs-review`,
      },
    },
    transaction,
  );
  return ["review-notice"];
}

async function ownedOrder(by: User, orderId: number, transaction?: Transaction) {
  const order =
    Number.isInteger(orderId) && orderId > 0
      ? await Order.findByPk(orderId, transaction ? locked(transaction) : {})
      : null;
  const listing = order ? await Listing.findByPk(order.listingId, { transaction }) : null;
  if (!order || !listing || orderRole(by, order, listing) !== "seller")
    throw new DomainError("not_found", "No such order among your sales.");
  return order;
}

/**
 * A refund asked for by a person (the coach's button or a review's resolve). Refunding twice does nothing the
 * second time: the order is claimed first, and the provider call carries an idempotency key as well.
 */
export async function refundByPerson(
  by: User,
  orderId: number,
): Promise<{ already: boolean; removed: number; inFlight?: boolean }> {
  const claim = await writeTransaction(async (transaction) => {
    const order = await ownedOrder(by, orderId, transaction);
    if (order.status === "refunded") return { already: true as const, order };
    if (order.paidCents === null || !order.paymentIntentId)
      throw new DomainError("invalid", "There is no payment on record to refund.");
    if (order.refundRequestedAt && Date.now() - order.refundRequestedAt.getTime() < 60_000)
      return { already: true as const, order, inFlight: true };
    const at = new Date();
    await order.update({ refundRequestedAt: at }, { transaction });
    return { already: false as const, order, at };
  });
  if (claim.already) return { already: true, removed: 0, inFlight: "inFlight" in claim };
  let refund;
  try {
    refund = await payments().refunds.create(
      { payment_intent: claim.order.paymentIntentId!, metadata: { orderId: String(claim.order.id) } },
      { idempotencyKey: `pacewright-order-${claim.order.id}-refund` },
    );
  } catch (err) {
    await Order.update({ refundRequestedAt: null }, { where: { id: claim.order.id } });
    throw new DomainError(
      "upstream",
      `The payment provider refused the refund: ${(err as Error).message}. Nothing changed.`,
    );
  }
  const assignmentId = await writeTransaction(async (transaction) => {
    const order = (await Order.findByPk(claim.order.id, locked(transaction)))!;
    const change = factsFrom(
      order,
      "refund.created",
      { id: refund.id, amount: refund.amount, status: refund.status ?? "succeeded" },
      new Date(),
    );
    if (order.reviewReason) change.patch.reviewReason = null;
    await settle(order, change, transaction, `Refunded by ${by.name}.`);
    return order.assignmentId;
  });
  // The coach waits for the answer, so the removal runs now rather than on the runner's next turn (claimed like
  // any job: if another instance took it first, it is already running there).
  await runOrderFollowUps({ orderId: claim.order.id });
  // Counted from the claim: the provider's own refund event may have removed them a moment earlier.
  const removed = assignmentId
    ? await ScheduledSession.count({
        where: { assignmentId, status: "cancelled", cancelledAt: { [Op.gte]: claim.at } },
      })
    : 0;
  return { already: false, removed };
}

/** Resolves an order in review: deliver the plan (the payment stands), or close it when nothing was paid. */
export async function resolveReview(by: User, orderId: number, action: "deliver" | "close") {
  const result = await writeTransaction(async (transaction) => {
    const order = await ownedOrder(by, orderId, transaction);
    if (order.status !== "needs_review") throw new DomainError("invalid", "This order is not waiting for review.");
    const reason = order.reviewReason ?? "";
    if (action === "deliver") {
      if (order.paidCents === null)
        throw new DomainError(
          "invalid",
          "Nothing was paid for this order, so there is nothing to deliver. Close it instead.",
        );
      return settle(
        order,
        { patch: { reviewReason: null }, outcome: "delivered" },
        transaction,
        `Delivered by ${by.name} after review: ${reason}`,
      );
    }
    if (order.paidCents !== null && order.refundedCents < order.paidCents)
      throw new DomainError("invalid", "Money was paid for this order: deliver the plan or refund it.");
    return settle(
      order,
      { patch: { reviewReason: null, expiredAt: order.expiredAt ?? new Date() }, outcome: "closed" },
      transaction,
      `Closed by ${by.name} after review: ${reason}`,
    );
  });
  // Delivering places the plan at once, as the coach expects to see it; the job is claimed like any other.
  await runOrderFollowUps({ orderId });
  return result;
}

/** Money events the provider sent that match no order at all: only an admin can chase them. */
export async function unmatchedEvents() {
  const rows = await PaymentEvent.findAll({
    where: {
      orderId: null,
      outcome: "no-order",
      type: [
        "checkout.session.completed",
        "checkout.session.async_payment_succeeded",
        "payment_intent.succeeded",
        "charge.refunded",
        "refund.created",
        "refund.updated",
        "charge.dispute.created",
      ],
    },
    order: [["createdAt", "DESC"]],
    limit: 50,
  });
  return rows.map((r) => {
    let summary = "";
    try {
      const o = (JSON.parse(r.payload) as { data: { object: Obj } }).data.object;
      summary = [
        o.id,
        idOf(o.payment_intent),
        o.amount_total ?? o.amount_refunded ?? o.amount_received ?? o.amount,
        o.currency,
      ]
        .filter((x) => x !== undefined && x !== null)
        .join(" · ");
    } catch {
      summary = "unreadable payload";
    }
    return {
      id: r.id,
      providerEventId: r.providerEventId,
      type: r.type,
      summary,
      at: r.createdAt.toISOString().slice(0, 16).replace("T", " "),
    };
  });
}

/** Orders waiting for a person: the coach's own, or every one in the studio for an admin. */
export async function reviewQueue(user: User) {
  const listings = await Listing.findAll({ where: user.role === "admin" ? {} : { coachId: user.id } });
  if (!listings.length) return [];
  const orders = await Order.findAll({
    where: { listingId: listings.map((l) => l.id), status: "needs_review" },
    order: [["updatedAt", "ASC"]],
  });
  const people = new Map(
    (
      await User.findAll({
        where: { id: [...new Set([...orders.map((o) => o.buyerId), ...listings.map((l) => l.coachId)])] },
      })
    ).map((u) => [u.id, u]),
  );
  const byId = new Map(listings.map((l) => [l.id, l]));
  return orders.map((o) => {
    const l = byId.get(o.listingId)!;
    return {
      id: o.id,
      listing: l.title,
      coach: people.get(l.coachId)?.name ?? "",
      buyer: people.get(o.buyerId)?.name ?? "",
      buyerEmail: people.get(o.buyerId)?.email ?? "",
      reason: o.reviewReason ?? "",
      price: formatPrice(o.amountCents, o.currency),
      paid: o.paidCents === null ? null : formatPrice(o.paidCents, o.paidCurrency ?? o.currency),
      refunded: o.refundedCents ? formatPrice(o.refundedCents, o.paidCurrency ?? o.currency) : null,
      placed: o.assignmentId !== null,
      canDeliver: o.paidCents !== null && o.refundedCents < o.paidCents,
      canRefund: o.paidCents !== null && !!o.paymentIntentId && o.refundedCents < o.paidCents,
      canClose: o.paidCents === null || o.refundedCents >= o.paidCents,
      since: o.updatedAt.toISOString().slice(0, 16).replace("T", " "),
    };
  });
}
