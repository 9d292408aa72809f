/** What people do with orders (refund, resolve a review) and the queues they work from on the shop page. */
import { Op, type Transaction } from "sequelize";
import { writeTransaction } from "../db";
import { Listing, Order, PaymentEvent, ScheduledSession, User } from "../models";
import { payments } from "../payments";
import { formatPrice } from "~/lib/shop";
import { DomainError } from "../errors";
import { orderRole } from "../access";
import { factsFrom, idOf, locked, settle, type Obj } from "./orders";
import { runOrderFollowUps } from "./order-follow-ups";

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
