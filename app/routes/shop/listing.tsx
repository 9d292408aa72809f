import { useState } from "react";
import { Form, Link, redirect, useNavigation } from "react-router";
import { PhaseRibbon } from "~/components/phase-ribbon";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { Field, FormMessage } from "~/components/ui/field";
import { getUser, requireUser } from "~/.server/auth";
import { notFound } from "~/.server/http";
import { Listing, PlanItem, PlanWeek, User } from "~/.server/models";
import { placementContext } from "~/.server/services/placement";
import { formFailure } from "~/.server/replies";
import { formatPrice, startCheckout } from "~/.server/services/shop";
import { isIsoDate, todayIn } from "~/lib/dates";
import { formatMinutes } from "~/lib/duration";
import { messageOf, parseSubmission, refuse, useSchemaForm } from "~/lib/forms";
import { firstMondayAfter, overlapping, spanOf, type PlanSpan } from "~/lib/placement";
import { describeBlock } from "~/lib/sessions";
import { checkoutSchema } from "~/lib/shop";
import { blockDuration, type Block } from "~/lib/training";
import type { Route } from "./+types/listing";

export const meta: Route.MetaFunction = ({ data }) => [
  { title: `${data?.listing.title ?? "Plan"} · Plan shop · Pacewright` },
];

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
    .map((i) => ({
      name: i.name,
      durationS: (i.blocks as Block[]).reduce((s, b) => s + blockDuration(b), 0),
      lines: (i.blocks as Block[]).map(describeBlock),
    }));
  const coach = await User.findByPk(listing.coachId);
  const today = todayIn(viewer?.timezone ?? "UTC");
  const placement = viewer?.role === "athlete" ? await placementContext(viewer.id, listing.planId, today) : null;
  return {
    placement,
    listing: {
      slug: listing.slug,
      title: listing.title,
      coverText: listing.coverText,
      description: listing.description,
      sport: listing.sport,
      level: listing.level,
      weeks: listing.weeks,
      weeklyHours: listing.weeklyHours,
      price: formatPrice(listing.priceCents, listing.currency),
      published: listing.published,
      coach: coach?.name ?? "",
    },
    ribbon: weeks.map((w) => ({ idx: w.idx, phase: w.phase, recovery: w.recovery, test: w.test })),
    samples,
    viewer: viewer ? { role: viewer.role, name: viewer.name } : null,
    today,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const buyer = await requireUser(request);
  const listing = await Listing.findOne({ where: { slug: params.slug, published: true } });
  if (!listing) notFound("This plan is not in the shop.");
  const submission = parseSubmission(await request.formData(), checkoutSchema);
  if (submission.status !== "success") return refuse(submission);
  const choice = submission.value;
  // The same overlap check the page shows, repeated here: the buyer must have chosen before any money moves.
  let align: { mode: "start" | "event"; date: string } = { mode: choice.mode, date: choice.date };
  if (buyer.role === "athlete") {
    const { current } = await placementContext(buyer.id, listing.planId, todayIn(buyer.timezone));
    const clash = overlapping(current, spanOf(align.mode, align.date, listing.weeks));
    if (clash.length && !choice.placement)
      return refuse(submission, {
        fields: {
          placement: `These dates overlap ${clash.map((c) => `“${c.name}” (${c.from} to ${c.to})`).join(", ")}. Choose to start after it or to place the plan alongside.`,
        },
      });
    if (clash.length && choice.placement === "after") align = { mode: "start", date: firstMondayAfter(clash) };
  }
  try {
    const { url } = await startCheckout(buyer, listing, align, new URL(request.url).origin);
    return redirect(url);
  } catch (err) {
    return formFailure(err, submission);
  }
}

export default function ListingPage({ loaderData, actionData }: Route.ComponentProps) {
  const { listing, ribbon, samples, viewer, today, placement } = loaderData;
  const busy = useNavigation().state !== "idle";
  const back = `/shop/${listing.slug}`;
  const [form, fields] = useSchemaForm(checkoutSchema, actionData, { defaultValue: { mode: "start", date: today } });
  // Refilled from a refused submission, so the preview speaks of the dates that were sent.
  const [mode, setMode] = useState<"start" | "event">(fields.mode.initialValue === "event" ? "event" : "start");
  const [date, setDate] = useState(typeof fields.date.initialValue === "string" ? fields.date.initialValue : today);
  const span = isIsoDate(date) ? spanOf(mode, date, listing.weeks) : null;
  const clash = placement && span ? overlapping(placement.current, span) : [];
  // The overlap message sits beside the choice; if the dates no longer overlap it still shows, above the form.
  const refused = messageOf(actionData) ?? (clash.length ? undefined : fields.placement.errors?.[0]);
  return (
    <div className="mx-auto max-w-5xl">
      <p className="mb-2 text-sm">
        <Link to="/shop" className="text-teal underline">
          Plan shop
        </Link>{" "}
        / {listing.title}
      </p>
      {!listing.published && (
        <div className="mb-4">
          <FormMessage>Preview: this listing is not published, so buyers cannot see it yet.</FormMessage>
        </div>
      )}
      <h1 className="text-3xl font-semibold">{listing.title}</h1>
      {listing.coverText && <p className="mt-1 text-lg text-teal-dark">{listing.coverText}</p>}
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
            <p className="text-xs text-ink-soft">
              Targets are percentages of threshold; after you buy, you see your own watts, bpm and paces.
            </p>
            <ul className="mt-3 flex flex-col gap-3 text-sm">
              {samples.map((s) => (
                <li key={s.name}>
                  <span className="font-medium">{s.name}</span>{" "}
                  <span className="num text-ink-soft">{formatMinutes(s.durationS)}</span>
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
        <Card className="order-first self-start lg:order-none">
          <p className="num text-3xl font-semibold text-teal-dark">{listing.price}</p>
          {refused && (
            <div className="mt-3">
              <FormMessage>{refused}</FormMessage>
            </div>
          )}
          {viewer?.role === "athlete" ? (
            <Form
              method="post"
              id={form.id}
              onSubmit={form.onSubmit}
              noValidate
              className="mt-4 flex flex-col gap-3 text-sm"
            >
              <fieldset
                className="flex flex-col gap-1"
                aria-describedby={fields.mode.errors ? fields.mode.errorId : undefined}
              >
                <legend className="font-medium">Line the plan up</legend>
                <label className="flex items-center gap-2">
                  <input
                    type="radio"
                    name="mode"
                    value="start"
                    checked={mode === "start"}
                    onChange={() => setMode("start")}
                  />{" "}
                  start on the Monday on or after
                </label>
                <label className="flex items-center gap-2">
                  <input
                    type="radio"
                    name="mode"
                    value="event"
                    checked={mode === "event"}
                    onChange={() => setMode("event")}
                  />{" "}
                  end in the week of my event
                </label>
                {fields.mode.errors?.[0] && (
                  <p id={fields.mode.errorId} className="text-xs text-brick">
                    {fields.mode.errors[0]}
                  </p>
                )}
              </fieldset>
              <Field
                label={mode === "start" ? "Start date" : "Event date"}
                name="date"
                type="date"
                value={date}
                onChange={(e) => setDate(e.target.value)}
                min={today}
                required
                error={fields.date.errors?.[0]}
              />
              {span && (
                <p className="num text-xs text-ink-soft">
                  Week 1 starts Monday {span.from}; the last week ends {span.to}.
                </p>
              )}
              <Consequences
                placement={placement}
                clash={clash}
                error={fields.placement.errors?.[0]}
                errorId={fields.placement.errorId}
              />
              <button type="submit" className={buttonClass("primary", "py-2.5")} disabled={busy}>
                {busy ? "Opening checkout…" : `Buy for ${listing.price}`}
              </button>
              <p className="text-xs text-ink-soft">
                You pay on the payment provider's page; the plan lands on your calendar as soon as the payment is
                confirmed.
              </p>
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

/** What buying will do to this athlete's calendar, shown before any money moves. */
function Consequences({
  placement,
  clash,
  error,
  errorId,
}: {
  placement: { current: PlanSpan[]; missingThresholds: { sport: string; sessions: number }[] } | null;
  clash: PlanSpan[];
  error?: string;
  errorId: string;
}) {
  if (!placement) return null;
  return (
    <>
      {placement.missingThresholds.map((m) => (
        <div
          key={m.sport}
          className="rounded-lg border border-brick/40 bg-brick/5 p-3 text-xs"
          data-testid="needs-test-warning"
        >
          You have no {m.sport} threshold yet, so {m.sessions} session{m.sessions === 1 ? "" : "s"} will say “needs a
          field test” and show percentages until you do one; week 1 starts with a field test.{" "}
          <Link to="/athlete/tests/new" className="text-teal underline">
            Enter a test result first
          </Link>
        </div>
      ))}
      {clash.length > 0 && (
        <fieldset
          className="flex flex-col gap-1 rounded-lg border border-brick/40 bg-brick/5 p-3 text-xs"
          data-testid="overlap-warning"
          aria-describedby={error ? errorId : undefined}
        >
          <legend className="px-1 font-medium">These dates overlap your current plan</legend>
          <p>{clash.map((c) => `“${c.name}” runs ${c.from} to ${c.to}`).join("; ")}. Choose one:</p>
          <label className="flex items-center gap-2">
            <input type="radio" name="placement" value="after" required /> start after it ends (Monday{" "}
            {firstMondayAfter(clash)})
          </label>
          <label className="flex items-center gap-2">
            <input type="radio" name="placement" value="alongside" required /> place it alongside (both plans on the
            same days)
          </label>
          {error && (
            <p id={errorId} className="font-medium text-brick">
              {error}
            </p>
          )}
        </fieldset>
      )}
    </>
  );
}
