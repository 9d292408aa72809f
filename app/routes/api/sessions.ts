import { requireRole } from "~/.server/auth";
import { exportShelfSessions, listShelfSessions } from "~/.server/services/shelf";
import { shelfFilter } from "~/lib/shelf-filter";
import type { Route } from "./+types/sessions";

/** The coach's shelf as JSON, filtered in the query string; `?download=1` gives the export file. */
export async function loader({ request }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  const url = new URL(request.url);
  if (url.searchParams.get("download") === "1") {
    const body = JSON.stringify(await exportShelfSessions(coach.id), null, 2);
    return new Response(body, {
      headers: {
        "Content-Type": "application/json; charset=utf-8",
        "Content-Disposition": `attachment; filename="pacewright-sessions-${new Date().toISOString().slice(0, 10)}.json"`,
        "Cache-Control": "private, no-store",
      },
    });
  }
  const sessions = await listShelfSessions(coach.id, shelfFilter(url.searchParams));
  const tags = Array.from(new Set(sessions.flatMap((s) => s.tags))).sort();
  return Response.json({ sessions, tags }, { headers: { "Cache-Control": "private, no-store" } });
}
