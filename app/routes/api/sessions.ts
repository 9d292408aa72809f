import { requireRole } from "~/.server/auth";
import { exportShelfSessions, listShelfSessions } from "~/.server/services/shelf";
import { SPORTS } from "~/lib/sessions";
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
  const sport = url.searchParams.get("sport") ?? "";
  const sort = url.searchParams.get("sort");
  const sessions = await listShelfSessions(coach.id, {
    q: url.searchParams.get("q")?.trim().slice(0, 100) || undefined,
    sport: (SPORTS as readonly string[]).includes(sport) ? sport : undefined,
    tag: url.searchParams.get("tag")?.trim().slice(0, 30) || undefined,
    sort: sort === "updated" || sort === "duration" ? sort : "name",
    archived: url.searchParams.get("archived") === "1",
  });
  const tags = Array.from(new Set(sessions.flatMap((s) => s.tags))).sort();
  return Response.json({ sessions, tags }, { headers: { "Cache-Control": "private, no-store" } });
}
