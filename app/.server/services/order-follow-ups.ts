/**
 * The order's follow-up jobs (see the state machine in ./orders.ts): placing a paid plan on the buyer's calendar,
 * taking a refunded one off, and telling the seller an order waits for review.
 */
import { Op, type Transaction } from "sequelize";
import { writeTransaction } from "../db";
import { env } from "../env";
import { runDueJobs, type JobHandlers } from "../jobs";
import { queueEmail } from "../mail";
import {
  Assignment,
  Listing,
  Order,
  PlanWeek,
  ScheduledBlock,
  ScheduledSession,
  SeasonPlan,
  Threshold,
  User,
} from "../models";
import { alignStart, materialize, resolveSteps } from "./materialize";
import { thresholdHistory, thresholdSport } from "./thresholds";
import { addDays, todayIn } from "~/lib/dates";
import { defaultTestFor } from "~/lib/protocols";
import { formatPrice } from "~/lib/shop";
import { locked, settle } from "./orders";

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
