/** The payment provider's events: each verified event becomes facts on its order (see the state machine in ./orders.ts). */
import { Op, UniqueConstraintError, type Transaction } from "sequelize";
import { writeTransaction } from "../db";
import { Order, PaymentEvent, type OrderStatus } from "../models";
import { factsFrom, idOf, locked, settle, type Change, type Obj } from "./orders";

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
