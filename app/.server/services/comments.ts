import { writeTransaction } from "../db";
import { env } from "../env";
import { queueEmail } from "../mail";
import { scheduledSessionFor } from "../access";
import { CoachAthlete, SessionComment, User } from "../models";
import { DomainError } from "../errors";

export async function listComments(viewer: User, sessionId: number) {
  const session = await scheduledSessionFor(viewer, sessionId);
  if (!session) throw new DomainError("not_found", "No session with this id is on this calendar.");
  const rows = await SessionComment.findAll({
    where: { scheduledSessionId: session.id },
    order: [
      ["createdAt", "ASC"],
      ["id", "ASC"],
    ],
  });
  const authors = new Map(
    (
      await User.findAll({
        where: { id: [...new Set(rows.map((r) => r.authorId))] },
        attributes: ["id", "name", "role"],
      })
    ).map((u) => [u.id, u]),
  );
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
  const session = await scheduledSessionFor(viewer, sessionId);
  if (!session) throw new DomainError("not_found", "No session with this id is on this calendar.");
  const athlete = (await User.findByPk(session.athleteId))!;
  const recipients =
    viewer.role === "athlete"
      ? await User.findAll({
          where: { id: (await CoachAthlete.findAll({ where: { athleteId: athlete.id } })).map((l) => l.coachId) },
        })
      : [athlete];
  const base = env().appUrl;
  return writeTransaction(async (transaction) => {
    const comment = await SessionComment.create(
      { scheduledSessionId: session.id, authorId: viewer.id, body },
      { transaction },
    );
    for (const to of recipients) {
      const link =
        to.role === "coach"
          ? `${base}/coach/athletes/${athlete.id}/sessions/${session.id}`
          : `${base}/athlete/sessions/${session.id}`;
      await queueEmail(
        {
          to: to.email,
          template: "session-comment",
          vars: { name: to.name, author: viewer.name, session: session.name, date: session.date, body, link },
        },
        transaction,
      );
    }
    return comment;
  });
}
