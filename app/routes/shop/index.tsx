import { useEffect, useState } from "react";
import { Link, useFetcher } from "react-router";
import { Card, PageHeader } from "~/components/ui/card";
import { publishedListings } from "~/.server/services/shop";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Plan shop · Pacewright" }];

// Public: anyone may look; buying needs an athlete account.
export async function loader() {
  return { listings: await publishedListings() };
}

type Listings = Route.ComponentProps["loaderData"]["listings"];

export default function Shop({ loaderData }: Route.ComponentProps) {
  const fetcher = useFetcher<{ listings: Listings }>();
  const [sport, setSport] = useState("");
  const [maxWeeks, setMaxWeeks] = useState("");
  const [maxHours, setMaxHours] = useState("");
  useEffect(() => {
    if (!sport && !maxWeeks && !maxHours && !fetcher.data) return;
    fetcher.load(`/api/shop?${new URLSearchParams({ sport, maxWeeks, maxHours })}`);
  }, [sport, maxWeeks, maxHours]); // eslint-disable-line react-hooks/exhaustive-deps
  const listings = fetcher.data?.listings ?? loaderData.listings;
  return (
    <div>
      <PageHeader title="Plan shop" lead="Season plans from coaches, written in percent of threshold: they fit your numbers from day one." />
      <div className="mb-4 flex flex-wrap gap-3 rounded-xl border border-line bg-white p-4 text-sm">
        <label className="flex flex-col gap-1">
          <span className="font-medium">Sport</span>
          <select value={sport} onChange={(e) => setSport(e.target.value)} className="rounded-lg border border-line bg-white px-3 py-2">
            <option value="">All</option>
            <option value="bike">Bike</option>
            <option value="run">Run</option>
            <option value="swim">Swim</option>
            <option value="multi">Multisport</option>
          </select>
        </label>
        <label className="flex flex-col gap-1">
          <span className="font-medium">At most weeks</span>
          <input type="number" min={4} max={104} value={maxWeeks} onChange={(e) => setMaxWeeks(e.target.value)} className="w-28 rounded-lg border border-line px-3 py-2" />
        </label>
        <label className="flex flex-col gap-1">
          <span className="font-medium">At most hours a week</span>
          <input type="number" min={1} max={40} value={maxHours} onChange={(e) => setMaxHours(e.target.value)} className="w-28 rounded-lg border border-line px-3 py-2" />
        </label>
      </div>
      {listings.length === 0 ? (
        <Card>
          <p className="text-ink-soft">No plans match.</p>
        </Card>
      ) : (
        <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3" aria-label="Plans for sale">
          {listings.map((l) => (
            <li key={l.id}>
              <Link to={`/shop/${l.slug}`} className="block h-full rounded-xl border border-line bg-white p-4 shadow-sm hover:border-teal">
                <h2 className="font-semibold">{l.title}</h2>
                {l.coverText && <p className="mt-0.5 text-sm font-medium text-teal-dark">{l.coverText}</p>}
                <p className="num mt-1 text-sm text-ink-soft">
                  {l.weeks} weeks · about {l.weeklyHours} h a week · {l.level} · by {l.coach}
                </p>
                <p className="mt-2 line-clamp-3 text-sm">{l.description}</p>
                <p className="num mt-3 text-lg font-semibold text-teal-dark">{l.price}</p>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
