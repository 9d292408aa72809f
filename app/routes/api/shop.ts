import { publishedListings } from "~/.server/services/shop";
import { shopFilter } from "~/lib/shop-filter";
import type { Route } from "./+types/shop";

// Public JSON for other clients (the page itself reads the same filters in its own loader); only published listings.
export async function loader({ request }: Route.LoaderArgs) {
  const filter = shopFilter(new URL(request.url).searchParams);
  return Response.json({ listings: await publishedListings(filter) }, { headers: { "Cache-Control": "no-store" } });
}
