import { data, Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import { Logo } from "~/components/logo";
import { PhaseRibbon } from "~/components/phase-ribbon";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { Field, FormMessage } from "~/components/ui/field";
import { getUser, requireUser } from "~/.server/auth";
import { notFound } from "~/.server/http";
import { Listing, PlanItem, PlanWeek, User } from "~/.server/models";
import { formatPrice, ShopError, startCheckout } from "~/.server/services/shop";
import { isIsoDate, todayIn } from "~/lib/dates";
import { formatMinutes } from "~/lib/duration";
import { parseForm } from "~/lib/forms";
import { describeBlock } from "~/lib/sessions";
import { blockDuration, type Block } from "~/lib/training";
import type { Route } from "./+types/listing";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.listing.title ?? "Plan"} · Plan shop · Pacewright` }];

// Public page; a signed-in coach may also preview their own unpublished listing.
export async function loader({ request, params }: Route.LoaderArgs) {
  const viewer = await getUser(request);
  const listing = await Listing.findOne({ where: { slug: params.slug } });
  if (!listing || (!listing.published && viewer?.id !== listing.coachId)) notFound("This plan is not in the shop.");
  const weeks = await PlanWeek.findAll({ where: { planId: listing.planId }, order: [["idx", "ASC"]] });
  const items = await PlanItem.findAll({ where: { planId: listing.planId }, order: [["id", "ASC"]] });
  const seen = new Set<string>();
  const samples = items
    .filter((i) => !seen.has(i.name) && seen.add(i.name))
    .slice(0, 4)
    .map((i) => ({ name: i.name, durationS: (i.blocks as Block[]).reduce((s, b) => s + blockDuration(b), 0), lines: (i.blocks as Block[]).map(describeBlock) }));
  const coach = await User.findByPk(listing.coachId);
  return {
    listing: { slug: listing.slug, title: listing.title, description: listing.description, sport: listing.sport, level: listing.level, weeks: listing.weeks, weeklyHours: listing.weeklyHours, price: formatPrice(listing.priceCents, listing.currency), published: listing.published, coach: coach?.name ?? "" },
    ribbon: weeks.map((w) => ({ idx: w.idx, phase: w.phase, recovery: w.recovery, test: w.test })),
    samples,
    viewer: viewer ? { role: viewer.role, name: viewer.name } : null,
    today: todayIn(viewer?.timezone ?? "UTC"),
  };
}

const checkoutSchema = z.object({ mode: z.enum(["start", "event"], { error: "Choose how to line the plan up." }), date: z.string().refine(isIsoDate, "Choose a date.") });

export async function action({ request, params }: Route.ActionArgs) {
  const buyer = await requireUser(request);
  const listing = await Listing.findOne({ where: { slug: params.slug, published: true } });
  if (!listing) notFound("This plan is not in the shop.");
  const parsed = parseForm(checkoutSchema, await request.formData());
  if (!parsed.ok) return data({ error: Object.values(parsed.fieldErrors)[0] ?? "Check the form." }, { status: 400 });
  try {
    const { url } = await startCheckout(buyer, listing, parsed.data);
    return redirect(url);
  } catch (err) {
    if (err instanceof ShopError) return data({ error: err.message }, { status: err.status });
    throw err;
  }
}

export default function ListingPage({ loaderData, actionData }: Route.ComponentProps) {
  const { listing, ribbon, samples, viewer, today } = loaderData;
  const busy = useNavigation().state !== "idle";
  const back = `/shop/${listing.slug}`;
  return (
    <div className="mx-auto max-w-5xl px-4 py-6">
      <Link to="/shop" className="mb-6 flex items-center gap-2 text-xl font-semibold text-teal">
        <Logo /> Plan shop
      </Link>
      {!listing.published && (
        <div className="mb-4">
          <FormMessage>Preview: this listing is not published, so buyers cannot see it yet.</FormMessage>
        </div>
      )}
      <h1 className="text-3xl font-semibold">{listing.title}</h1>
      <p className="num mt-1 text-ink-soft">
        {listing.weeks} weeks · about {listing.weeklyHours} h a week · {listing.level} · by {listing.coach}
      </p>
      <div className="mt-6 grid gap-6 lg:grid-cols-[1fr_20rem]">
        <div className="flex flex-col gap-6">
          <Card>
            <p className="whitespace-pre-line">{listing.description}</p>
            <PhaseRibbon weeks={ribbon} className="mt-4" />
          </Card>
          <Card>
            <h2 className="font-semibold">Sample sessions</h2>
            <p className="text-xs text-ink-soft">Targets are percentages of threshold; after you buy, you see your own watts, bpm and paces.</p>
            <ul className="mt-3 flex flex-col gap-3 text-sm">
              {samples.map((s) => (
                <li key={s.name}>
                  <span className="font-medium">{s.name}</span> <span className="num text-ink-soft">{formatMinutes(s.durationS)}</span>
                  <ul className="num ml-4 list-disc text-ink-soft">
                    {s.lines.map((l, i) => (
                      <li key={i}>{l}</li>
                    ))}
                  </ul>
                </li>
              ))}
            </ul>
          </Card>
        </div>
        <Card className="self-start">
          <p className="num text-3xl font-semibold text-teal-dark">{listing.price}</p>
          {actionData?.error && (
            <div className="mt-3">
              <FormMessage>{actionData.error}</FormMessage>
            </div>
          )}
          {viewer?.role === "athlete" ? (
            <Form method="post" className="mt-4 flex flex-col gap-3 text-sm">
              <fieldset className="flex flex-col gap-1">
                <legend className="font-medium">Line the plan up</legend>
                <label className="flex items-center gap-2">
                  <input type="radio" name="mode" value="start" defaultChecked /> start on the Monday on or after
                </label>
                <label className="flex items-center gap-2">
                  <input type="radio" name="mode" value="event" /> end in the week of my event
                </label>
              </fieldset>
              <Field label="Date" name="date" type="date" defaultValue={today} min={today} required />
              <button type="submit" className={buttonClass("primary", "py-2.5")} disabled={busy}>
                {busy ? "Opening checkout…" : `Buy for ${listing.price}`}
              </button>
              <p className="text-xs text-ink-soft">You pay on the payment provider's page; the plan lands on your calendar as soon as the payment is confirmed.</p>
            </Form>
          ) : viewer ? (
            <p className="mt-4 text-sm text-ink-soft">Plans are bought with an athlete account.</p>
          ) : (
            <div className="mt-4 flex flex-col gap-2">
              <Link to={`/signup?redirectTo=${encodeURIComponent(back)}`} className={buttonClass("primary")}>
                Create an athlete account to buy
              </Link>
              <Link to={`/login?redirectTo=${encodeURIComponent(back)}`} className={buttonClass("secondary")}>
                I have an account
              </Link>
            </div>
          )}
        </Card>
      </div>
    </div>
  );
}
