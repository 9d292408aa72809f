import { data } from "react-router";
import { z } from "zod";
import { parseForm } from "~/lib/forms";
import { writeTransaction } from "../db";
import { env } from "../env";
import { queueEmail } from "../mail";
import { CoachAthlete, ScheduledSession, SessionComment, User } from "../models";

export const commentSchema = z.object({ body: z.string().trim().min(1, "Write something first.").max(2000, "Keep a comment under 2000 characters.") });

export class CommentError extends Error {
  name = "CommentError";
  constructor(
    message: string,
    readonly status = 404,
  ) {
    super(message);
  }
}

/**
 * The session, if `viewer` may read and write its thread: the athlete it belongs to, or one of that athlete's
 * coaches. Anyone else learns nothing (the caller answers 404).
 */
async function sessionFor(viewer: User, sessionId: number) {
  if (!Number.isInteger(sessionId) || sessionId <= 0) return null;
  const session = await ScheduledSession.findByPk(sessionId);
  if (!session) return null;
  if (viewer.role === "athlete") return session.athleteId === viewer.id ? session : null;
  if (viewer.role === "coach") return (await CoachAthlete.count({ where: { coachId: viewer.id, athleteId: session.athleteId } })) ? session : null;
  return null;
}

export async function listComments(viewer: User, sessionId: number) {
  const session = await sessionFor(viewer, sessionId);
  if (!session) throw new CommentError("No session with this id is on this calendar.");
  const rows = await SessionComment.findAll({ where: { scheduledSessionId: session.id }, order: [["createdAt", "ASC"], ["id", "ASC"]] });
  const authors = new Map((await User.findAll({ where: { id: [...new Set(rows.map((r) => r.authorId))] }, attributes: ["id", "name", "role"] })).map((u) => [u.id, u]));
  return rows.map((r) => ({
    id: r.id,
    body: r.body,
    at: r.createdAt.toISOString(),
    author: authors.get(r.authorId)?.name ?? "someone",
    role: authors.get(r.authorId)?.role ?? "athlete",
    mine: r.authorId === viewer.id,
  }));
}

/** Adds a comment and, in the same transaction, an e-mail notice to the other side (the athlete, or their coaches). */
export async function addComment(viewer: User, sessionId: number, body: string) {
  const session = await sessionFor(viewer, sessionId);
  if (!session) throw new CommentError("No session with this id is on this calendar.");
  const athlete = (await User.findByPk(session.athleteId))!;
  const recipients =
    viewer.role === "athlete"
      ? await User.findAll({ where: { id: (await CoachAthlete.findAll({ where: { athleteId: athlete.id } })).map((l) => l.coachId) } })
      : [athlete];
  const base = env().appUrl;
  return writeTransaction(async (transaction) => {
    const comment = await SessionComment.create({ scheduledSessionId: session.id, authorId: viewer.id, body }, { transaction });
    for (const to of recipients) {
      const link = to.role === "coach" ? `${base}/coach/athletes/${athlete.id}/sessions/${session.id}` : `${base}/athlete/sessions/${session.id}`;
      await queueEmail({ to: to.email, template: "session-comment", vars: { name: to.name, author: viewer.name, session: session.name, date: session.date, body, link } }, transaction);
    }
    return comment;
  });
}

/** The form handler both session pages (athlete's and coach's) use for a new message. */
export async function commentAction(viewer: User, sessionId: number, form: FormData) {
  const parsed = parseForm(commentSchema, form);
  if (!parsed.ok) return data({ ok: false, message: "Check the message.", fieldErrors: parsed.fieldErrors }, { status: 400 });
  try {
    await addComment(viewer, sessionId, parsed.data.body);
    return { ok: true, message: "Sent.", fieldErrors: {} };
  } catch (err) {
    if (err instanceof CommentError) return data({ ok: false, message: err.message, fieldErrors: {} }, { status: err.status });
    throw err;
  }
}
