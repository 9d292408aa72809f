import { SPORTS } from "~/lib/sessions";

/** The shelf's filters as the URL carries them (`?q=tempo&sport=bike&tag=build&sort=updated&archived=1`). */
export const SHELF_SORTS = ["name", "updated", "duration"] as const;

export interface ShelfFilter {
  q?: string;
  sport?: string;
  tag?: string;
  sort: (typeof SHELF_SORTS)[number];
  archived: boolean;
}

const text = (v: string | null, max: number) => v?.trim().slice(0, max) || undefined;

/** Unknown values are dropped rather than refused: a stale or hand-edited link still shows the shelf. */
export function shelfFilter(params: URLSearchParams): ShelfFilter {
  const sport = params.get("sport");
  const sort = params.get("sort");
  return {
    q: text(params.get("q"), 100),
    sport: SPORTS.find((s) => s === sport),
    tag: text(params.get("tag"), 30)?.toLowerCase(),
    sort: SHELF_SORTS.find((s) => s === sort) ?? "name",
    archived: params.get("archived") === "1",
  };
}

/** The filter as a short query string: defaults and empty fields are left out, so a plain shelf has a plain URL. */
export function shelfSearch(entries: Iterable<[string, FormDataEntryValue]>): URLSearchParams {
  const out = new URLSearchParams();
  for (const [k, v] of entries) {
    if (typeof v !== "string" || v.trim() === "" || (k === "sort" && v === "name")) continue;
    out.set(k, v.trim());
  }
  return out;
}
