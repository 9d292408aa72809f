import { publishedListings } from "~/.server/services/shop";
import type { Route } from "./+types/shop";

// Public: the shop window is open to anyone; only published listings are ever returned.
export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const sport = url.searchParams.get("sport") ?? "";
  const maxWeeks = Number(url.searchParams.get("maxWeeks")) || undefined;
  const maxHours = Number(url.searchParams.get("maxHours")) || undefined;
  return Response.json({ listings: await publishedListings({ sport: ["bike", "run", "swim", "multi"].includes(sport) ? sport : undefined, maxWeeks, maxHours }) }, { headers: { "Cache-Control": "no-store" } });
}
