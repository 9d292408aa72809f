import { Form, Link, useNavigation, useSubmit } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { publishedListings } from "~/.server/services/shop";
import { shopFilter } from "~/lib/shop-filter";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Plan shop · Pacewright" }];

// Public: anyone may look; buying needs an athlete account. The filters are search params, so a filtered window can
// be shared and survives a reload.
export async function loader({ request }: Route.LoaderArgs) {
  const filter = shopFilter(new URL(request.url).searchParams);
  return { filter, listings: await publishedListings(filter) };
}

export default function Shop({ loaderData }: Route.ComponentProps) {
  const { listings, filter } = loaderData;
  const submit = useSubmit();
  const navigation = useNavigation();
  return (
    <div>
      <PageHeader
        title="Plan shop"
        lead="Season plans from coaches, written in percent of threshold: they fit your numbers from day one."
      />
      <Form
        method="get"
        role="search"
        aria-label="Filter plans"
        className="mb-4 flex flex-wrap items-end gap-3 rounded-xl border border-line bg-white p-4 text-sm"
        // With JavaScript each change applies at once (replacing the history entry); without it, the button sends the form.
        onChange={(e) => submit(e.currentTarget, { replace: true, preventScrollReset: true })}
      >
        <label className="flex flex-col gap-1">
          <span className="font-medium">Sport</span>
          <select
            name="sport"
            defaultValue={filter.sport ?? ""}
            className="rounded-lg border border-line bg-white px-3 py-2"
          >
            <option value="">All</option>
            <option value="bike">Bike</option>
            <option value="run">Run</option>
            <option value="swim">Swim</option>
            <option value="multi">Multisport</option>
          </select>
        </label>
        <label className="flex flex-col gap-1">
          <span className="font-medium">At most weeks</span>
          <input
            name="maxWeeks"
            type="number"
            min={1}
            max={104}
            defaultValue={filter.maxWeeks ?? ""}
            className="w-28 rounded-lg border border-line px-3 py-2"
          />
        </label>
        <label className="flex flex-col gap-1">
          <span className="font-medium">At most hours a week</span>
          <input
            name="maxHours"
            type="number"
            min={1}
            max={40}
            defaultValue={filter.maxHours ?? ""}
            className="w-28 rounded-lg border border-line px-3 py-2"
          />
        </label>
        <button type="submit" className={buttonClass("secondary", "py-2")}>
          Show plans
        </button>
        {navigation.state === "loading" && navigation.location.pathname === "/shop" && (
          <span className="text-ink-soft">Loading…</span>
        )}
      </Form>
      {listings.length === 0 ? (
        <Card>
          <p className="text-ink-soft">No plans match.</p>
        </Card>
      ) : (
        <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3" aria-label="Plans for sale">
          {listings.map((l) => (
            <li key={l.id}>
              <Link
                to={`/shop/${l.slug}`}
                className="block h-full rounded-xl border border-line bg-white p-4 shadow-sm hover:border-teal"
              >
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
