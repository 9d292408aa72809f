import { z } from "zod";
import { requireUser } from "~/.server/auth";
import { requireAthleteFor } from "~/.server/access";
import { calendarRange, moveSession } from "~/.server/services/calendar";
import { jsonFailure } from "~/.server/replies";
import { daysBetween, isIsoDate } from "~/lib/dates";
import { jsonResponse as json, requireJson } from "~/.server/http";
import type { Route } from "./+types/calendar";

/** Sessions between `from` and `to` (at most 16 weeks) for the signed-in athlete, or for a coach's `athleteId`. */
export async function loader({ request }: Route.LoaderArgs) {
  const viewer = await requireUser(request);
  const url = new URL(request.url);
  const athlete = await requireAthleteFor(viewer, url.searchParams.get("athleteId"));
  const from = url.searchParams.get("from");
  const to = url.searchParams.get("to");
  if (!isIsoDate(from) || !isIsoDate(to)) return json({ error: "Give from and to as dates like 2027-01-04." }, 400);
  if (to < from || daysBetween(from, to) > 16 * 7)
    return json({ error: "Ask for at most 16 weeks, with to after from." }, 400);
  return json({ athleteId: athlete.id, from, to, sessions: await calendarRange(athlete.id, from, to) });
}

const moveSchema = z.object({
  sessionId: z.number().int().positive(),
  date: z.string().refine(isIsoDate, "Give a date like 2027-01-04."),
});

/** Moves one planned session to another day: { sessionId, date } (and athleteId for a coach). */
export async function action({ request }: Route.ActionArgs) {
  const viewer = await requireUser(request);
  const url = new URL(request.url);
  const athlete = await requireAthleteFor(viewer, url.searchParams.get("athleteId"));
  requireJson(request);
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    return json({ error: "Send the move as JSON." }, 400);
  }
  const parsed = moveSchema.safeParse(body);
  if (!parsed.success) return json({ error: parsed.error.issues[0].message }, 400);
  try {
    const s = await moveSession(athlete.id, parsed.data.sessionId, parsed.data.date);
    return json({ ok: true, id: s.id, date: s.date });
  } catch (err) {
    return jsonFailure(err);
  }
}
