import { createColumnHelper } from "@tanstack/react-table";
import { useEffect, useRef } from "react";
import { data, Link, useFetcher } from "react-router";
import { DataTable } from "~/components/data-table";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { AccountError, inviteAthlete, rosterFor } from "~/.server/services/accounts";
import { formatDate } from "~/lib/format";
import { formatThreshold } from "~/lib/zone-table";
import { inviteSchema, parseForm } from "~/lib/forms";
import type { Route } from "./+types/roster";

export const meta: Route.MetaFunction = () => [{ title: "Roster · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  return { coachName: coach.name, timezone: coach.timezone, ...(await rosterFor(coach.id)) };
}

export async function action({ request }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const parsed = parseForm(inviteSchema, await request.formData());
  if (!parsed.ok) return data({ ok: false as const, fieldErrors: parsed.fieldErrors, values: parsed.values }, { status: 400 });
  try {
    await inviteAthlete(coach, parsed.data);
  } catch (err) {
    if (err instanceof AccountError)
      return data({ ok: false as const, fieldErrors: { [err.field ?? "form"]: err.message }, values: parsed.data }, { status: 400 });
    throw err;
  }
  return { ok: true as const, sentTo: parsed.data.email, fieldErrors: {}, values: {} };
}

type Athlete = Route.ComponentProps["loaderData"]["athletes"][number];

const thresholdText = (t: { sport: string; value: number; unit: string }) => `${t.sport} ${formatThreshold(t.value, t.unit)}`;
const column = createColumnHelper<Athlete>();

export default function Roster({ loaderData }: Route.ComponentProps) {
  const { athletes, invitations, timezone } = loaderData;
  const columns = [
    column.accessor("name", {
      header: "Athlete",
      cell: (c) => (
        <Link to={`/coach/athletes/${c.row.original.id}`} className="font-medium text-teal underline-offset-2 hover:underline">
          {c.getValue()}
        </Link>
      ),
    }),
    column.accessor("email", { header: "E-mail" }),
    column.accessor((r) => r.thresholds.map((t) => thresholdText(t)).join(" · "), { id: "thresholds", header: "Thresholds", cell: (c) => c.getValue() || <span className="text-brick">needs a field test</span> }),
    column.accessor((r) => r.retest.lastTest ?? "", { id: "lastTest", header: "Last test", cell: (c) => c.getValue() || "—" }),
    column.accessor((r) => r.retest.due ?? "", {
      id: "due",
      header: "Retest due",
      cell: (c) => {
        const r = c.row.original;
        if (!r.retest.due) return "—";
        const overdue = r.retest.due < r.today;
        return (
          <span className={overdue ? "font-medium text-brick" : ""} title={r.retest.why}>
            {r.retest.due}
            {overdue ? " (overdue)" : ""}
          </span>
        );
      },
    }),
    column.accessor((r) => r.load.compliance ?? -1, {
      id: "compliance",
      header: "Done, last 4 weeks",
      cell: (c) => {
        const l = c.row.original.load;
        return (
          <span data-testid="roster-compliance">
            {l.compliance === null ? "—" : `${Math.round(l.compliance * 100)} % (${l.done}/${l.planned})`}
            {l.spike && <span className="ml-2 rounded bg-brick/15 px-1.5 text-xs font-medium text-brick" title={`Acute:chronic ratio ${l.ratio}`}>load spike</span>}
          </span>
        );
      },
    }),
  ];
  return (
    <>
      <PageHeader title="Roster" lead={`${athletes.length} athlete${athletes.length === 1 ? "" : "s"} coached by you.`} />
      <div className="grid gap-6 lg:grid-cols-[1fr_22rem]">
        <DataTable
          data={athletes}
          columns={columns}
          caption="Athletes on your roster"
          initialSort={[{ id: "name", desc: false }]}
          empty="No athletes yet. Invite your first one with the form."
        />
        <div className="flex flex-col gap-6">
          <InviteForm />
          <Card aria-labelledby="pending-heading">
            <h2 id="pending-heading" className="font-semibold">
              Invitations waiting
            </h2>
            {invitations.length === 0 ? (
              <p className="mt-2 text-sm text-ink-soft">None open.</p>
            ) : (
              <ul className="mt-3 flex flex-col divide-y divide-line text-sm">
                {invitations.map((i) => (
                  <li key={i.id} className="py-2">
                    <span className="font-medium">{i.name || i.email}</span>
                    {i.name && <span className="block text-ink-soft">{i.email}</span>}
                    <span className="block text-xs text-ink-soft">
                      Sent {formatDate(i.sentAt, timezone)} · works until {formatDate(i.expiresAt, timezone)}
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </Card>
        </div>
      </div>
    </>
  );
}

function InviteForm() {
  const fetcher = useFetcher<typeof action>();
  const formRef = useRef<HTMLFormElement>(null);
  const result = fetcher.data;
  const errors: Record<string, string | undefined> = result && !result.ok ? result.fieldErrors : {};
  useEffect(() => {
    if (fetcher.state === "idle" && result?.ok) formRef.current?.reset();
  }, [fetcher.state, result]);
  return (
    <Card aria-labelledby="invite-heading">
      <h2 id="invite-heading" className="font-semibold">
        Invite an athlete
      </h2>
      <p className="mt-1 text-sm text-ink-soft">They get an e-mail with a link to join your roster.</p>
      <fetcher.Form method="post" ref={formRef} className="mt-4 flex flex-col gap-3" noValidate>
        {errors.form && <FormMessage>{errors.form}</FormMessage>}
        {result?.ok && <FormMessage tone="ok">Invitation sent to {result.sentTo}.</FormMessage>}
        <Field label="E-mail" name="email" type="email" error={errors.email} required />
        <Field label="Name (optional)" name="name" error={errors.name} />
        <button type="submit" className={buttonClass("primary")} disabled={fetcher.state !== "idle"}>
          {fetcher.state !== "idle" ? "Sending…" : "Send invitation"}
        </button>
      </fetcher.Form>
    </Card>
  );
}
