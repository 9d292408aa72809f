import type { Transaction } from "sequelize";
import { requireRole } from "./auth";
import { forbidden, notFound } from "./http";
import { CoachAthlete, Listing, Order, ScheduledSession, SeasonPlan, SessionComment, Upload, User } from "./models";

/**
 * Who may see or change which record. One rule per kind of record, read by every loader and action (after the
 * auth helper) and by the services that check a record they were handed an id for. A record that is not the
 * viewer's is reported as missing: the answer is 404, never 403, so ids of other people's records reveal nothing.
 * Role-wide refusals (a coach page for an athlete) stay 403 in `requireRole`.
 *
 * The `…For` functions answer the record or null; the `require…` functions answer it or throw the 404.
 */

const validId = (id: unknown): id is number => Number.isInteger(id) && (id as number) > 0;

/** A coach sees the athletes on their own roster, nobody else's. */
export async function coachesAthlete(coachId: number, athleteId: number, transaction?: Transaction): Promise<boolean> {
  if (!validId(athleteId)) return false;
  return (await CoachAthlete.count({ where: { coachId, athleteId }, transaction })) > 0;
}

/** Whether `viewer` may act on the athlete's records: the athlete themselves, or one of their coaches. */
export async function mayActFor(viewer: User, athleteId: number): Promise<boolean> {
  if (viewer.role === "athlete") return viewer.id === athleteId;
  if (viewer.role === "coach") return coachesAthlete(viewer.id, athleteId);
  return false;
}

/** The athlete `viewer` may act for, by id. */
export async function athleteFor(viewer: User, athleteId: number): Promise<User | null> {
  if (!validId(athleteId) || !(await mayActFor(viewer, athleteId))) return null;
  if (viewer.id === athleteId) return viewer;
  return User.findByPk(athleteId);
}

/** A plan is its owning coach's alone (athletes see the sessions it placed on their calendar, not the plan). */
export async function planFor(viewer: User, planId: number, transaction?: Transaction): Promise<SeasonPlan | null> {
  if (viewer.role !== "coach" || !validId(planId)) return null;
  return SeasonPlan.findOne({ where: { id: planId, ownerId: viewer.id }, transaction });
}

/** A scheduled session (a day on an athlete's calendar): its athlete's and their coaches'. */
export async function scheduledSessionFor(viewer: User, sessionId: number): Promise<ScheduledSession | null> {
  if (!validId(sessionId)) return null;
  const session = await ScheduledSession.findByPk(sessionId);
  return session && (await mayActFor(viewer, session.athleteId)) ? session : null;
}

/** A comment belongs to its session's thread: whoever may see the session may read it. */
export async function commentFor(viewer: User, commentId: number): Promise<SessionComment | null> {
  if (!validId(commentId)) return null;
  const comment = await SessionComment.findByPk(commentId);
  return comment && (await scheduledSessionFor(viewer, comment.scheduledSessionId)) ? comment : null;
}

/** A ride file: its athlete's and their coaches'. */
export async function uploadFor(viewer: User, uploadId: number): Promise<{ upload: Upload; athlete: User } | null> {
  if (!validId(uploadId)) return null;
  const upload = await Upload.findByPk(uploadId);
  if (!upload || !(await mayActFor(viewer, upload.athleteId))) return null;
  return { upload, athlete: upload.athleteId === viewer.id ? viewer : (await User.findByPk(upload.athleteId))! };
}

/**
 * Who an order is shown to: the buyer sees their own order; the coach who sells the listing, and an admin, manage
 * it (refund, review). Anyone else gets nothing.
 */
export function orderRole(viewer: User, order: Order, listing: Listing | null): "buyer" | "seller" | null {
  if (order.buyerId === viewer.id) return "buyer";
  if (viewer.role === "admin" || (listing && viewer.role === "coach" && listing.coachId === viewer.id)) return "seller";
  return null;
}

export async function orderFor(
  viewer: User,
  orderId: number,
): Promise<{ order: Order; listing: Listing | null; as: "buyer" | "seller" } | null> {
  if (!validId(orderId)) return null;
  const order = await Order.findByPk(orderId);
  if (!order) return null;
  const listing = await Listing.findByPk(order.listingId);
  const as = orderRole(viewer, order, listing);
  return as ? { order, listing, as } : null;
}

// ---- Route guards: the record or a 404 page. ----

export const NO_ATHLETE = "No athlete with this id is on your roster.";

/** The athlete a coach acts for, from the URL: one on their roster, else 404. */
export async function requireAthleteFor(viewer: User, athleteIdParam: string | null | undefined): Promise<User> {
  if (viewer.role === "athlete") return viewer;
  if (viewer.role !== "coach") forbidden("Calendars belong to athletes and their coaches.");
  const athlete = await athleteFor(viewer, Number(athleteIdParam));
  if (!athlete) notFound(NO_ATHLETE);
  return athlete;
}

/**
 * Pages shared by athletes and coaches: under /coach/athletes/:athleteId a coach acts for one of their athletes
 * (404 for anyone else's); elsewhere an athlete acts for themselves.
 */
export async function requireAthleteSubject(
  request: Request,
  athleteIdParam?: string,
): Promise<{ viewer: User; athlete: User; base: string }> {
  if (athleteIdParam !== undefined) {
    const coach = await requireRole(request, "coach");
    const athlete = await requireAthleteFor(coach, athleteIdParam);
    return { viewer: coach, athlete, base: `/coach/athletes/${athlete.id}` };
  }
  const athlete = await requireRole(request, "athlete");
  return { viewer: athlete, athlete, base: "/athlete" };
}

export async function requirePlan(viewer: User, planIdParam: string | number | undefined): Promise<SeasonPlan> {
  const plan = await planFor(viewer, Number(planIdParam));
  if (!plan) notFound("No plan with this id is yours.");
  return plan;
}

export async function requireUpload(
  viewer: User,
  uploadIdParam: string | number | undefined,
  message = "No ride file with this id.",
): Promise<{ upload: Upload; athlete: User }> {
  const found = await uploadFor(viewer, Number(uploadIdParam));
  if (!found) notFound(message);
  return found;
}

export async function requireOrder(viewer: User, orderIdParam: string | number | undefined) {
  const found = await orderFor(viewer, Number(orderIdParam));
  if (!found) notFound("No such order.");
  return found;
}

/** A scheduled session the viewer may see; under a coach's athlete URL it must also be that athlete's. */
export async function requireScheduledSession(
  viewer: User,
  sessionIdParam: string | number | undefined,
  athlete?: User,
): Promise<ScheduledSession> {
  const session = await scheduledSessionFor(viewer, Number(sessionIdParam));
  if (!session || (athlete && session.athleteId !== athlete.id))
    notFound("No session with this id is on this calendar.");
  return session;
}
