import { createColumnHelper } from "@tanstack/react-table";
import { Link, useFetcher } from "react-router";
import { DataTable } from "~/components/data-table";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { formFailure } from "~/.server/replies";
import { inviteAthlete } from "~/.server/services/invitations";
import { rosterFor } from "~/.server/services/roster";
import { formatDate } from "~/lib/format";
import { formatThreshold } from "~/lib/zone-table";
import { accepted, fieldProps, inviteSchema, parseSubmission, refuse, useSchemaForm } from "~/lib/forms";
import type { Route } from "./+types/roster";

export const meta: Route.MetaFunction = () => [{ title: "Roster · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  return { coachName: coach.name, timezone: coach.timezone, ...(await rosterFor(coach.id)) };
}

export async function action({ request }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const submission = parseSubmission(await request.formData(), inviteSchema);
  if (submission.status !== "success") return refuse(submission);
  try {
    await inviteAthlete(coach, submission.value);
  } catch (err) {
    return formFailure(err, submission);
  }
  // The form empties for the next address (conform resets it on this reply).
  return accepted(submission, `Invitation sent to ${submission.value.email}.`);
}

type Athlete = Route.ComponentProps["loaderData"]["athletes"][number];

const thresholdText = (t: { sport: string; value: number; unit: string }) =>
  `${t.sport} ${formatThreshold(t.value, t.unit)}`;
const column = createColumnHelper<Athlete>();

/** The last field test; thresholds typed in by hand have no test, so their date says since when they hold. */
function lastTestText(r: Athlete) {
  if (r.retest.lastTest) return r.retest.lastTest;
  const since = r.thresholds
    .map((t) => t.since)
    .sort()
    .at(-1);
  return since ? `no test; thresholds set ${since}` : "none yet";
}
function complianceText(l: Athlete["load"]) {
  return l.compliance === null
    ? "nothing planned yet"
    : `${Math.round(l.compliance * 100)} % (${l.done} of ${l.planned} sessions)`;
}

export default function Roster({ loaderData }: Route.ComponentProps) {
  const { athletes, invitations, timezone } = loaderData;
  const columns = [
    column.accessor("name", {
      header: "Athlete",
      cell: (c) => (
        <Link
          to={`/coach/athletes/${c.row.original.id}`}
          className="font-medium text-teal underline-offset-2 hover:underline"
        >
          {c.getValue()}
        </Link>
      ),
    }),
    column.accessor("email", { header: "E-mail" }),
    column.accessor((r) => r.thresholds.map((t) => thresholdText(t)).join(" · "), {
      id: "thresholds",
      header: "Thresholds",
      cell: (c) => c.getValue() || <span className="text-brick">needs a field test</span>,
    }),
    column.accessor((r) => lastTestText(r), { id: "lastTest", header: "Last test" }),
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
            {complianceText(l)}
            {l.spike && <SpikeFlag ratio={l.ratio} />}
          </span>
        );
      },
    }),
  ];
  return (
    <>
      <PageHeader
        title="Roster"
        lead={`${athletes.length} athlete${athletes.length === 1 ? "" : "s"} coached by you.`}
      />
      <div className="grid gap-6 lg:grid-cols-[1fr_22rem]">
        <div className="hidden md:block">
          <DataTable
            data={athletes}
            columns={columns}
            caption="Athletes on your roster"
            initialSort={[{ id: "name", desc: false }]}
            empty="No athletes yet. Invite your first one with the form."
          />
        </div>
        {/* On a phone the table's columns do not fit: one card per athlete with the same facts. */}
        <ul className="flex flex-col gap-3 md:hidden" aria-label="Athletes on your roster">
          {athletes.length === 0 && (
            <li className="text-sm text-ink-soft">No athletes yet. Invite your first one with the form.</li>
          )}
          {[...athletes]
            .sort((a, b) => a.name.localeCompare(b.name))
            .map((a) => (
              <li key={a.id} className="rounded-xl border border-line bg-white p-4 text-sm" data-testid="roster-card">
                <Link
                  to={`/coach/athletes/${a.id}`}
                  className="text-base font-semibold text-teal underline-offset-2 hover:underline"
                >
                  {a.name}
                </Link>
                <p className="break-all text-ink-soft">{a.email}</p>
                <dl className="mt-2 grid grid-cols-[7rem_1fr] gap-x-2 gap-y-1">
                  <dt className="text-ink-soft">Thresholds</dt>
                  <dd>
                    {a.thresholds.length ? (
                      a.thresholds.map((t) => thresholdText(t)).join(" · ")
                    ) : (
                      <span className="text-brick">needs a field test</span>
                    )}
                  </dd>
                  <dt className="text-ink-soft">Last test</dt>
                  <dd className="num">{lastTestText(a)}</dd>
                  <dt className="text-ink-soft">Retest due</dt>
                  <dd className="num">
                    {a.retest.due ?? "—"}
                    {a.retest.due && a.retest.due < a.today && (
                      <span className="font-medium text-brick"> (overdue)</span>
                    )}
                  </dd>
                  <dt className="text-ink-soft">Done, last 4 weeks</dt>
                  <dd className="num">
                    {complianceText(a.load)}
                    {a.load.spike && <SpikeFlag ratio={a.load.ratio} />}
                  </dd>
                </dl>
              </li>
            ))}
        </ul>
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

/** The acute:chronic flag in plain words (7-day against 28-day load; Gabbett 2016 bands are guidance only). */
function SpikeFlag({ ratio }: { ratio: number | null }) {
  return (
    <span
      className="ml-2 inline-block rounded bg-brick/15 px-1.5 text-xs font-medium text-brick"
      title={`Last 7 days' load is ${ratio} times the 28-day usual`}
    >
      load spike{ratio !== null ? `: ${ratio} × usual` : ""}
    </span>
  );
}

function InviteForm() {
  const fetcher = useFetcher<typeof action>();
  const result = fetcher.data;
  const [form, fields] = useSchemaForm(inviteSchema, result, { id: "invite-athlete" });
  const sent = result && "message" in result ? result.message : null;
  return (
    <Card aria-labelledby="invite-heading">
      <h2 id="invite-heading" className="font-semibold">
        Invite an athlete
      </h2>
      <p className="mt-1 text-sm text-ink-soft">They get an e-mail with a link to join your roster.</p>
      <fetcher.Form method="post" id={form.id} onSubmit={form.onSubmit} className="mt-4 flex flex-col gap-3" noValidate>
        {form.errors?.[0] && <FormMessage>{form.errors[0]}</FormMessage>}
        {sent && <FormMessage tone="ok">{sent}</FormMessage>}
        <Field key={fields.email.key} label="E-mail" type="email" required {...fieldProps(fields.email)} />
        <Field key={fields.name.key} label="Name (optional)" {...fieldProps(fields.name)} />
        <button type="submit" className={buttonClass("primary")} disabled={fetcher.state !== "idle"}>
          {fetcher.state !== "idle" ? "Sending…" : "Send invitation"}
        </button>
      </fetcher.Form>
    </Card>
  );
}
