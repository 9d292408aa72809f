import { requireRole } from "~/.server/auth";
import { requirePlan } from "~/.server/access";
import { listShelfSessions } from "~/.server/services/shelf";
import { shelfFilter } from "~/lib/shelf-filter";
import type { Route } from "./+types/board-shelf";

/**
 * The board's shelf search (`?q=`), read by the board's fetcher. The board's own route answers it, as plain data, so
 * the page does not lean on `/api/sessions`, which stays the documented JSON API for other clients.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  await requirePlan(coach, params.planId);
  const sessions = await listShelfSessions(coach.id, shelfFilter(new URL(request.url).searchParams));
  return {
    sessions: sessions.map(({ id, name, sport, durationS, profile, tags }) => ({
      id,
      name,
      sport,
      durationS,
      profile,
      tags,
    })),
  };
}
