import { createColumnHelper } from "@tanstack/react-table";
import { useEffect, useRef, useState } from "react";
import type { FieldMetadata } from "@conform-to/react";
import { Link, useFetcher } from "react-router";
import { DataTable } from "~/components/data-table";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage, SelectField } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { Listing, SeasonPlan } from "~/.server/models";
import { formFailure } from "~/.server/replies";
import { resolveReview, reviewQueue, unmatchedEvents } from "~/.server/services/order-review";
import {
  createListing,
  formatPrice,
  refundOrder,
  salesFor,
  setPublished,
  updateListing,
} from "~/.server/services/shop";
import {
  CURRENCIES,
  inCents,
  LEVELS,
  listingEditSchema,
  listingIdSchema,
  listingSchema,
  orderIdSchema,
} from "~/lib/shop";
import {
  accepted,
  firstMessage,
  jsonRefusal,
  parseSubmission,
  refuse,
  useSchemaForm,
  type FormReply,
} from "~/lib/forms";
import type { Route } from "./+types/shop";

export const meta: Route.MetaFunction = () => [{ title: "Selling plans · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const coach = await requireRole(request, ["coach", "admin"]);
  const plans = await SeasonPlan.findAll({ where: { ownerId: coach.id }, order: [["name", "ASC"]] });
  const listings = await Listing.findAll({ where: { coachId: coach.id }, order: [["createdAt", "DESC"]] });
  const sales = await salesFor(coach);
  const totals = new Map<string, number>();
  for (const s of sales)
    if (s.status === "fulfilled")
      totals.set(s.currency, (totals.get(s.currency) ?? 0) + (s.paidCents ?? s.amountCents));
  return {
    admin: coach.role === "admin",
    plans: plans.map((p) => ({ id: p.id, name: p.name })),
    listings: listings.map((l) => ({
      id: l.id,
      slug: l.slug,
      title: l.title,
      description: l.description,
      coverText: l.coverText ?? "",
      level: l.level,
      priceText: (l.priceCents / 100).toFixed(2),
      currency: l.currency,
      price: formatPrice(l.priceCents, l.currency),
      published: l.published,
      weeks: l.weeks,
    })),
    sales,
    review: await reviewQueue(coach),
    unmatched: coach.role === "admin" ? await unmatchedEvents() : [],
    totals: [...totals.entries()].map(([c, cents]) => formatPrice(cents, c)),
  };
}

export async function action({ request }: Route.ActionArgs) {
  const coach = await requireRole(request, ["coach", "admin"]);
  const form = await request.formData();
  const intent = form.get("intent");
  if (intent === "create") {
    const submission = parseSubmission(form, listingSchema);
    if (submission.status !== "success") return refuse(submission, { form: "Check the listing." });
    try {
      const l = await createListing(coach, inCents(submission.value));
      return accepted(submission, `Listed “${l.title}” (not published yet: preview it, then publish).`);
    } catch (err) {
      return formFailure(err, submission);
    }
  }
  if (intent === "edit") {
    const submission = parseSubmission(form, listingEditSchema);
    if (submission.status !== "success") return refuse(submission, { form: "Check the listing." });
    try {
      const l = await updateListing(coach, inCents(submission.value));
      return accepted(
        submission,
        `Saved “${l.title}”: the next buyer sees ${formatPrice(l.priceCents, l.currency)}; earlier orders keep their price.`,
        { reset: false },
      );
    } catch (err) {
      return formFailure(err, submission);
    }
  }
  if (intent === "deliver" || intent === "close") {
    const submission = parseSubmission(form, orderIdSchema);
    if (submission.status !== "success") return refuse(submission, { form: "Unknown request." });
    try {
      await resolveReview(coach, submission.value.orderId, intent);
      return accepted(
        submission,
        intent === "deliver"
          ? "Delivered: the plan is on the buyer's calendar."
          : "Closed: nothing was paid, nothing was placed.",
      );
    } catch (err) {
      return formFailure(err, submission);
    }
  }
  if (intent === "publish" || intent === "unpublish") {
    const submission = parseSubmission(form, listingIdSchema);
    if (submission.status !== "success") return refuse(submission, { form: "Unknown request." });
    try {
      await setPublished(coach, submission.value.listingId, intent === "publish");
      return accepted(
        submission,
        intent === "publish" ? "Published: it is in the shop." : "Unpublished: it left the shop.",
      );
    } catch (err) {
      return formFailure(err, submission);
    }
  }
  if (intent === "refund") {
    const submission = parseSubmission(form, orderIdSchema);
    if (submission.status !== "success") return refuse(submission, { form: "Unknown request." });
    try {
      const r = await refundOrder(coach, submission.value.orderId);
      if (r.already)
        return accepted(
          submission,
          r.inFlight ? "A refund for this order is already on its way." : "Already refunded: nothing more to do.",
        );
      return accepted(
        submission,
        `Refunded; ${r.removed} future session${r.removed === 1 ? "" : "s"} removed from the buyer's calendar.`,
      );
    } catch (err) {
      return formFailure(err, submission);
    }
  }
  return jsonRefusal("Unknown request.");
}

type Reply = FormReply & { message?: string };

/** What a one-line reply says: the success message, or the first refusal. */
function noteOf(reply: Reply | undefined) {
  if (!reply) return null;
  if (reply.status === "success") return { ok: true, message: reply.message ?? "" };
  return { ok: false, message: firstMessage(reply) ?? "Check the form." };
}

/** First message per listing field, from conform's state (browser check or the action's reply). */
function listingErrors(fields: Record<string, FieldMetadata<unknown>>, keys: string[]) {
  return Object.fromEntries(keys.map((k) => [k, fields[k]?.errors?.[0]]));
}
const LISTING_KEYS = ["title", "coverText", "description", "level", "price"];

type Data = Route.ComponentProps["loaderData"];
type Sale = Data["sales"][number];
type ListingRow = Data["listings"][number];
type ReviewRow = Data["review"][number];
const column = createColumnHelper<Sale>();

/**
 * Two steps in the page instead of window.confirm: the question replaces the button, focus moves to the answer,
 * and Escape or "Keep" puts the button back — the same by mouse, keyboard and touch.
 */
function RefundButton({ sale }: { sale: { id: number; amount: string; status?: string } }) {
  const fetcher = useFetcher<typeof action>();
  const note = noteOf(fetcher.data);
  const [asking, setAsking] = useState(false);
  const confirmRef = useRef<HTMLButtonElement>(null);
  useEffect(() => {
    if (asking) confirmRef.current?.focus();
  }, [asking]);
  if (note?.ok)
    return (
      <span className="block text-xs text-teal" role="status">
        {note.message}
      </span>
    );
  if (sale.status && sale.status !== "fulfilled") return null;
  return (
    <fetcher.Form
      method="post"
      onSubmit={() => setAsking(false)}
      onKeyDown={(e) => e.key === "Escape" && setAsking(false)}
    >
      <input type="hidden" name="orderId" value={sale.id} />
      {asking ? (
        <span
          role="group"
          aria-label={`Confirm the refund of order #${sale.id}`}
          className="flex flex-wrap items-center gap-2"
        >
          <span className="text-xs">Refund {sale.amount} and remove its future sessions?</span>
          <button ref={confirmRef} name="intent" value="refund" className={buttonClass("danger", "px-2 py-1")}>
            Yes, refund
          </button>
          <button type="button" onClick={() => setAsking(false)} className={buttonClass("secondary", "px-2 py-1")}>
            Keep
          </button>
        </span>
      ) : (
        <button
          type="button"
          onClick={() => setAsking(true)}
          className={buttonClass("ghost", "px-2 py-1 text-brick")}
          disabled={fetcher.state !== "idle"}
        >
          {fetcher.state !== "idle" ? "Refunding…" : "Refund"}
        </button>
      )}
      {note && !note.ok && <span className="block text-xs text-brick">{note.message}</span>}
    </fetcher.Form>
  );
}

// Defined once at module level: the table renders a cell function as a component, so a new function on every
// render would remount every cell (and the fetcher inside each Refund button, which re-renders the route again).
const SALES_COLUMNS = [
  column.accessor("id", { header: "Order", cell: (c) => `#${c.getValue()}` }),
  column.accessor("listing", { header: "Plan" }),
  column.accessor("buyer", { header: "Buyer", cell: (c) => `${c.getValue()} (${c.row.original.buyerEmail})` }),
  column.accessor("status", {
    header: "Status",
    cell: (c) => (
      <>
        <span
          data-testid="sale-status"
          data-status={c.getValue()}
          className={c.getValue() === "needs_review" ? "font-medium text-brick" : undefined}
        >
          {c.row.original.label}
        </span>
        {c.row.original.note && <span className="block max-w-56 text-xs text-ink-soft">{c.row.original.note}</span>}
      </>
    ),
  }),
  column.accessor("amountCents", { header: "Amount", cell: (c) => c.row.original.amount }),
  column.accessor("date", { header: "Date" }),
  column.display({ id: "refund", header: "", cell: (c) => <RefundButton sale={c.row.original} /> }),
];

function ReviewItem({ row }: { row: ReviewRow }) {
  const fetcher = useFetcher<typeof action>();
  const note = noteOf(fetcher.data);
  return (
    <li className="flex flex-col gap-2 py-3" data-testid="review-item">
      <div className="flex flex-wrap items-baseline gap-x-3">
        <span className="font-medium">
          #{row.id} · {row.listing}
        </span>
        <span className="text-ink-soft">
          {row.buyer} ({row.buyerEmail}) · sold by {row.coach} · since {row.since}
        </span>
      </div>
      <p className="text-brick">{row.reason}</p>
      <p className="num text-xs text-ink-soft">
        Price {row.price} · paid {row.paid ?? "nothing on record"}
        {row.refunded ? ` · refunded ${row.refunded}` : ""} · {row.placed ? "sessions placed" : "no sessions placed"}
      </p>
      {note && <FormMessage tone={note.ok ? "ok" : "error"}>{note.message}</FormMessage>}
      <div className="flex flex-wrap gap-2">
        {row.canDeliver && (
          <fetcher.Form method="post">
            <input type="hidden" name="orderId" value={row.id} />
            <button
              name="intent"
              value="deliver"
              className={buttonClass("primary", "px-3 py-1")}
              disabled={fetcher.state !== "idle"}
            >
              Deliver the plan
            </button>
          </fetcher.Form>
        )}
        {row.canRefund && <RefundButton sale={{ id: row.id, amount: row.paid ?? row.price }} />}
        {row.canClose && (
          <fetcher.Form method="post">
            <input type="hidden" name="orderId" value={row.id} />
            <button
              name="intent"
              value="close"
              className={buttonClass("secondary", "px-3 py-1")}
              disabled={fetcher.state !== "idle"}
            >
              Close (nothing to deliver)
            </button>
          </fetcher.Form>
        )}
      </div>
    </li>
  );
}

function ListingFields({ errors, values }: { errors: Record<string, string | undefined>; values?: ListingRow }) {
  return (
    <>
      <Field label="Title in the shop" name="title" error={errors.title} defaultValue={values?.title} />
      <Field
        label="Cover text"
        name="coverText"
        error={errors.coverText}
        defaultValue={values?.coverText}
        hint="One line shown on the shop card."
        maxLength={200}
      />
      <label className="flex flex-col gap-1 text-sm">
        <span className="font-medium">Description</span>
        <textarea
          name="description"
          rows={4}
          defaultValue={values?.description}
          className={`rounded-lg border px-3 py-2 ${errors.description ? "border-brick" : "border-line"}`}
        />
        {errors.description && <span className="text-brick">{errors.description}</span>}
      </label>
      <SelectField label="Level" name="level" error={errors.level} defaultValue={values?.level}>
        {LEVELS.map((l) => (
          <option key={l} value={l}>
            {l}
          </option>
        ))}
      </SelectField>
    </>
  );
}

function ListingItem({ listing }: { listing: ListingRow }) {
  const toggle = useFetcher<typeof action>();
  const edit = useFetcher<typeof action>();
  const toggled = noteOf(toggle.data);
  const saved = noteOf(edit.data);
  const [form, fields] = useSchemaForm(listingEditSchema, edit.data, { id: `edit-listing-${listing.id}` });
  const [editing, setEditing] = useState(false);
  const errors = listingErrors(fields, LISTING_KEYS);
  // A saved edit closes the form, once per answer.
  const [closedFor, setClosedFor] = useState<typeof edit.data>(undefined);
  if (edit.state === "idle" && saved?.ok && closedFor !== edit.data) {
    setClosedFor(edit.data);
    setEditing(false);
  }
  return (
    <li className="py-2" data-testid="listing-row">
      <div className="flex flex-wrap items-center gap-3">
        <span className="flex-1 font-medium">{listing.title}</span>
        <span className="num">{listing.price}</span>
        <span className={listing.published ? "text-teal" : "text-ink-soft"}>
          {listing.published ? "in the shop" : "not published"}
        </span>
        <Link to={`/shop/${listing.slug}`} className="text-teal underline">
          Preview
        </Link>
        <button
          type="button"
          onClick={() => setEditing((v) => !v)}
          aria-expanded={editing}
          className={buttonClass("secondary", "px-3 py-1")}
        >
          {editing ? "Close editor" : "Edit"}
        </button>
        <toggle.Form method="post">
          <input type="hidden" name="listingId" value={listing.id} />
          <button
            name="intent"
            value={listing.published ? "unpublish" : "publish"}
            className={buttonClass("secondary", "px-3 py-1")}
            disabled={toggle.state !== "idle"}
          >
            {listing.published ? "Unpublish" : "Publish"}
          </button>
        </toggle.Form>
      </div>
      {toggled && <FormMessage tone={toggled.ok ? "ok" : "error"}>{toggled.message}</FormMessage>}
      {saved?.ok && !editing && <FormMessage tone="ok">{saved.message}</FormMessage>}
      {editing && (
        <edit.Form
          method="post"
          id={form.id}
          onSubmit={form.onSubmit}
          className="mt-3 flex flex-col gap-3 rounded-lg border border-line bg-paper/50 p-3"
          noValidate
          aria-label={`Edit ${listing.title}`}
        >
          {form.errors?.[0] && <FormMessage tone="error">{form.errors[0]}</FormMessage>}
          <input type="hidden" name="listingId" value={listing.id} />
          <ListingFields errors={errors} values={listing} />
          <Field
            label={`Price (${listing.currency})`}
            name="price"
            inputMode="decimal"
            error={errors.price}
            defaultValue={listing.priceText}
            hint="From 0.50 to 10,000. Orders already made keep the price they were made at."
          />
          <button
            name="intent"
            value="edit"
            className={buttonClass("primary", "self-start")}
            disabled={edit.state !== "idle"}
          >
            {edit.state !== "idle" ? "Saving…" : "Save listing"}
          </button>
        </edit.Form>
      )}
    </li>
  );
}

export default function CoachShop({ loaderData }: Route.ComponentProps) {
  const { plans, listings, sales, totals, review, admin, unmatched } = loaderData;
  const create = useFetcher<typeof action>();
  const created = noteOf(create.data);
  const [form, fields] = useSchemaForm(listingSchema, create.data, { id: "create-listing" });
  const errors = listingErrors(fields, [...LISTING_KEYS, "planId", "currency"]);
  return (
    <>
      <PageHeader
        title="Selling plans"
        lead={
          admin
            ? "Every order in the studio; orders that need a person are listed first."
            : "Put a season plan in the shop; a paid order places it on the buyer's calendar, scaled to their thresholds."
        }
      />
      <section
        id="needs-review"
        aria-labelledby="needs-review-title"
        className={`mb-6 rounded-xl border p-5 ${review.length ? "border-brick/50 bg-brick/5" : "border-line bg-white"}`}
      >
        <h2 id="needs-review-title" className="font-semibold">
          Needs review{" "}
          {review.length > 0 && (
            <span className="num ml-1 rounded-full bg-brick px-2 py-0.5 text-xs text-white">{review.length}</span>
          )}
        </h2>
        {review.length === 0 ? (
          <p className="mt-1 text-sm text-ink-soft">Nothing waiting: every payment event matched its order.</p>
        ) : (
          <ul className="mt-1 flex flex-col divide-y divide-line text-sm">
            {review.map((r) => (
              <ReviewItem key={r.id} row={r} />
            ))}
          </ul>
        )}
        {unmatched.length > 0 && (
          <div className="mt-3 border-t border-line pt-3 text-sm" data-testid="unmatched-events">
            <h3 className="font-medium">Provider events that match no order</h3>
            <p className="text-xs text-ink-soft">
              Money moved at the provider for something this studio has no order for (or not yet): look it up there.
            </p>
            <ul className="num mt-1 flex flex-col gap-1 text-xs">
              {unmatched.map((e) => (
                <li key={e.id}>
                  {e.at} · {e.type} · {e.providerEventId} · {e.summary}
                </li>
              ))}
            </ul>
          </div>
        )}
      </section>
      <div className={`grid gap-6 ${plans.length || !admin ? "lg:grid-cols-[22rem_1fr]" : ""}`}>
        {(plans.length > 0 || !admin) && (
          <Card className="self-start">
            <h2 className="font-semibold">List a plan</h2>
            <create.Form
              method="post"
              id={form.id}
              onSubmit={form.onSubmit}
              className="mt-3 flex flex-col gap-3"
              noValidate
            >
              {created?.ok ? (
                <FormMessage tone="ok">{created.message}</FormMessage>
              ) : (
                form.errors?.[0] && <FormMessage tone="error">{form.errors[0]}</FormMessage>
              )}
              <SelectField label="Season plan" name="planId" error={errors.planId}>
                {plans.map((p) => (
                  <option key={p.id} value={p.id}>
                    {p.name}
                  </option>
                ))}
              </SelectField>
              <ListingFields errors={errors} />
              <div className="grid grid-cols-2 gap-2">
                <Field label="Price" name="price" inputMode="decimal" error={errors.price} />
                <SelectField label="Currency" name="currency" error={errors.currency}>
                  {CURRENCIES.map((c) => (
                    <option key={c} value={c}>
                      {c}
                    </option>
                  ))}
                </SelectField>
              </div>
              <button name="intent" value="create" className={buttonClass("primary")}>
                Create listing
              </button>
            </create.Form>
          </Card>
        )}
        <div className="flex min-w-0 flex-col gap-6">
          <Card>
            <h2 className="font-semibold">Your listings</h2>
            <ul className="mt-2 flex flex-col divide-y divide-line text-sm">
              {listings.map((l) => (
                <ListingItem key={l.id} listing={l} />
              ))}
              {listings.length === 0 && <li className="py-2 text-ink-soft">Nothing listed yet.</li>}
            </ul>
          </Card>
          <div>
            <div className="mb-2 flex items-baseline justify-between">
              <h2 className="font-semibold">Sales</h2>
              <span className="num text-sm">Paid: {totals.length ? totals.join(" · ") : "—"}</span>
            </div>
            <DataTable
              data={sales}
              columns={SALES_COLUMNS}
              caption="Orders of your plans"
              empty="No orders yet."
              initialSort={SORT}
            />
          </div>
        </div>
      </div>
    </>
  );
}

const SORT = [{ id: "id", desc: true }];
