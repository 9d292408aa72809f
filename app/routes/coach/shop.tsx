import { createColumnHelper } from "@tanstack/react-table";
import { data, Link, useFetcher } from "react-router";
import { DataTable } from "~/components/data-table";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage, SelectField } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { Listing, SeasonPlan } from "~/.server/models";
import { createListing, formatPrice, listingSchema, refundOrder, salesFor, setPublished, ShopError } from "~/.server/services/shop";
import { CURRENCIES, LEVELS } from "~/lib/shop";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/shop";

export const meta: Route.MetaFunction = () => [{ title: "Selling plans · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const coach = await requireRole(request, ["coach", "admin"]);
  const plans = await SeasonPlan.findAll({ where: { ownerId: coach.id }, order: [["name", "ASC"]] });
  const listings = await Listing.findAll({ where: { coachId: coach.id }, order: [["createdAt", "DESC"]] });
  const sales = await salesFor(coach);
  const totals = new Map<string, number>();
  for (const s of sales) if (s.status === "fulfilled") totals.set(s.currency, (totals.get(s.currency) ?? 0) + s.amountCents);
  return {
    plans: plans.map((p) => ({ id: p.id, name: p.name })),
    listings: listings.map((l) => ({ id: l.id, slug: l.slug, title: l.title, price: formatPrice(l.priceCents, l.currency), published: l.published, weeks: l.weeks })),
    sales,
    totals: [...totals.entries()].map(([c, cents]) => formatPrice(cents, c)),
  };
}

type Result = { ok: boolean; message: string; fieldErrors?: Record<string, string | undefined> };

export async function action({ request }: Route.ActionArgs) {
  const coach = await requireRole(request, ["coach", "admin"]);
  const form = await request.formData();
  const intent = form.get("intent");
  try {
    if (intent === "create") {
      const parsed = parseForm(listingSchema, form);
      if (!parsed.ok) return data<Result>({ ok: false, message: "Check the listing.", fieldErrors: parsed.fieldErrors }, { status: 400 });
      const l = await createListing(coach, parsed.data);
      return { ok: true, message: `Listed “${l.title}” (not published yet: preview it, then publish).` } satisfies Result;
    }
    if (intent === "publish" || intent === "unpublish") {
      await setPublished(coach, Number(form.get("listingId")), intent === "publish");
      return { ok: true, message: intent === "publish" ? "Published: it is in the shop." : "Unpublished: it left the shop." } satisfies Result;
    }
    if (intent === "refund") {
      const n = await refundOrder(coach, Number(form.get("orderId")));
      return { ok: true, message: `Refunded; ${n} future session${n === 1 ? "" : "s"} removed from the buyer's calendar.` } satisfies Result;
    }
  } catch (err) {
    if (err instanceof ShopError) return data<Result>({ ok: false, message: err.message }, { status: err.status });
    throw err;
  }
  return data<Result>({ ok: false, message: "Unknown request." }, { status: 400 });
}

type Sale = Route.ComponentProps["loaderData"]["sales"][number];
const column = createColumnHelper<Sale>();

function RefundButton({ sale }: { sale: Sale }) {
  const fetcher = useFetcher<Result>();
  if (sale.status !== "fulfilled") return null;
  return (
    <fetcher.Form method="post" onSubmit={(e) => !confirm(`Refund order #${sale.id} and remove its future sessions?`) && e.preventDefault()}>
      <input type="hidden" name="orderId" value={sale.id} />
      <button name="intent" value="refund" className={buttonClass("ghost", "px-2 py-1 text-brick")} disabled={fetcher.state !== "idle"}>
        Refund
      </button>
      {fetcher.data && <span className={`block text-xs ${fetcher.data.ok ? "text-teal" : "text-brick"}`}>{fetcher.data.message}</span>}
    </fetcher.Form>
  );
}

export default function CoachShop({ loaderData }: Route.ComponentProps) {
  const { plans, listings, sales, totals } = loaderData;
  const create = useFetcher<Result>();
  const toggle = useFetcher<Result>();
  const errors = create.data?.fieldErrors ?? {};
  const columns = [
    column.accessor("id", { header: "Order", cell: (c) => `#${c.getValue()}` }),
    column.accessor("listing", { header: "Plan" }),
    column.accessor("buyer", { header: "Buyer", cell: (c) => `${c.getValue()} (${c.row.original.buyerEmail})` }),
    column.accessor("status", { header: "Status", cell: (c) => <span data-testid="sale-status">{c.getValue()}</span> }),
    column.accessor("amountCents", { header: "Amount", cell: (c) => c.row.original.amount }),
    column.accessor("date", { header: "Date" }),
    column.display({ id: "refund", header: "", cell: (c) => <RefundButton sale={c.row.original} /> }),
  ];
  return (
    <>
      <PageHeader title="Selling plans" lead="Put a season plan in the shop; a paid order places it on the buyer's calendar, scaled to their thresholds." />
      <div className="grid gap-6 lg:grid-cols-[22rem_1fr]">
        <Card>
          <h2 className="font-semibold">List a plan</h2>
          <create.Form method="post" className="mt-3 flex flex-col gap-3" noValidate>
            {create.data && <FormMessage tone={create.data.ok ? "ok" : "error"}>{create.data.message}</FormMessage>}
            <SelectField label="Season plan" name="planId" error={errors.planId}>
              {plans.map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name}
                </option>
              ))}
            </SelectField>
            <Field label="Title in the shop" name="title" error={errors.title} />
            <label className="flex flex-col gap-1 text-sm">
              <span className="font-medium">Description</span>
              <textarea name="description" rows={4} className={`rounded-lg border px-3 py-2 ${errors.description ? "border-brick" : "border-line"}`} />
              {errors.description && <span className="text-brick">{errors.description}</span>}
            </label>
            <SelectField label="Level" name="level" error={errors.level}>
              {LEVELS.map((l) => (
                <option key={l} value={l}>
                  {l}
                </option>
              ))}
            </SelectField>
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
        <div className="flex flex-col gap-6">
          <Card>
            <h2 className="font-semibold">Your listings</h2>
            {toggle.data && <FormMessage tone={toggle.data.ok ? "ok" : "error"}>{toggle.data.message}</FormMessage>}
            <ul className="mt-2 flex flex-col divide-y divide-line text-sm">
              {listings.map((l) => (
                <li key={l.id} className="flex flex-wrap items-center gap-3 py-2">
                  <span className="flex-1 font-medium">{l.title}</span>
                  <span className="num">{l.price}</span>
                  <span className={l.published ? "text-teal" : "text-ink-soft"}>{l.published ? "in the shop" : "not published"}</span>
                  <Link to={`/shop/${l.slug}`} className="text-teal underline">
                    Preview
                  </Link>
                  <toggle.Form method="post">
                    <input type="hidden" name="listingId" value={l.id} />
                    <button name="intent" value={l.published ? "unpublish" : "publish"} className={buttonClass("secondary", "px-3 py-1")}>
                      {l.published ? "Unpublish" : "Publish"}
                    </button>
                  </toggle.Form>
                </li>
              ))}
              {listings.length === 0 && <li className="py-2 text-ink-soft">Nothing listed yet.</li>}
            </ul>
          </Card>
          <div>
            <div className="mb-2 flex items-baseline justify-between">
              <h2 className="font-semibold">Sales</h2>
              <span className="num text-sm">Paid: {totals.length ? totals.join(" · ") : "—"}</span>
            </div>
            <DataTable data={sales} columns={columns} caption="Orders of your plans" empty="No orders yet." initialSort={[{ id: "id", desc: true }]} />
          </div>
        </div>
      </div>
    </>
  );
}
