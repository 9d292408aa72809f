import { useState } from "react";
import { Link, useFetcher } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { requirePlan } from "~/.server/access";
import { formFailure, loaderFailure } from "~/.server/replies";
import { Assignment, User } from "~/.server/models";
import { rosterFor } from "~/.server/services/roster";
import { assignPlan, pushPlanChanges } from "~/.server/services/materialize";
import { loadPlan } from "~/.server/services/plans";
import { currentThresholds } from "~/.server/services/thresholds";
import { todayIn } from "~/lib/dates";
import {
  accepted,
  fieldProps,
  firstMessage,
  type FormReply,
  messageOf,
  parseSubmission,
  refuse,
  useSchemaForm,
} from "~/lib/forms";
import { assignSchema, pushSchema } from "~/lib/plans";
import { formatThreshold } from "~/lib/zone-table";
import type { Route } from "./+types/assign";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Assign · ${data?.plan.name ?? "Plan"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  await requirePlan(coach, params.planId);
  const loaded = await loadPlan(coach.id, Number(params.planId)).catch(loaderFailure);
  const { athletes } = await rosterFor(coach.id);
  const today = todayIn(coach.timezone);
  const assignments = await Assignment.findAll({ where: { planId: loaded.plan.id }, order: [["createdAt", "DESC"]] });
  const rows = await Promise.all(
    athletes.map(async (a) => {
      const th = await currentThresholds(a.id, today);
      // One threshold format everywhere (pace as min:ss per km or per 100 m), the same as the roster's.
      return { id: a.id, name: a.name, thresholds: th.map((t) => `${t.sport} ${formatThreshold(t.value, t.unit)}`) };
    }),
  );
  const names = new Map(athletes.map((a) => [a.id, a.name]));
  return {
    plan: loaded.plan,
    weeks: loaded.weeks.length,
    athletes: rows,
    today,
    assignments: assignments.map((a) => ({
      id: a.id,
      athlete: names.get(a.athleteId) ?? "—",
      startDate: a.startDate,
      outdated: a.planVersion < loaded.plan.version,
    })),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const planId = (await requirePlan(coach, params.planId)).id;
  const form = await request.formData();
  if (form.get("intent") === "push") {
    const submission = parseSubmission(form, pushSchema);
    if (submission.status !== "success") return refuse(submission);
    try {
      const r = await pushPlanChanges(coach, planId);
      return accepted(
        submission,
        `Pushed the current plan to ${r.assignments} calendar${r.assignments === 1 ? "" : "s"}: ${r.updated} future session${r.updated === 1 ? "" : "s"} updated.`,
      );
    } catch (err) {
      return formFailure(err, submission);
    }
  }
  const submission = parseSubmission(form, assignSchema);
  if (submission.status !== "success") return refuse(submission, { form: "Check the form." });
  const v = submission.value;
  const choice = v.decided
    ? {
        overlap: v.overlap,
        replaceFrom: v.replaceFrom,
        confirmSports: v.confirmSports === "on",
        confirmTests: v.confirmTests === "on",
      }
    : undefined;
  try {
    const r = await assignPlan(coach, planId, v.athleteIds, { mode: v.mode, date: v.date, choice });
    const users = await User.findAll({ where: { id: v.athleteIds } });
    const nameOf = new Map(users.map((u) => [u.id, u.name]));
    if (r.reports.length) {
      // Not a refusal of what was typed: the form stays as it is and asks for the coach's answer.
      const reply = submission.reply({
        formErrors: ["Nothing has been placed yet. Check what would happen and choose."],
      }) as FormReply;
      return {
        ...reply,
        start: r.start,
        reports: r.reports.map((x) => ({ ...x, athlete: nameOf.get(x.athleteId) ?? "athlete" })),
      };
    }
    const total = r.results.reduce((s, x) => s + x.sessions, 0);
    const cancelled = r.results.reduce((s, x) => s + x.cancelled, 0);
    const names = users.map((u) => u.name).join(", ");
    return accepted(
      submission,
      `Placed ${total} sessions for ${names}, starting Monday ${r.start}.${cancelled ? ` ${cancelled} earlier planned session${cancelled === 1 ? " was" : "s were"} replaced.` : ""}`,
      { reset: false },
    );
  } catch (err) {
    return formFailure(err, submission);
  }
}

export default function Assign({ loaderData }: Route.ComponentProps) {
  const { plan, athletes, assignments, today, weeks } = loaderData;
  const fetcher = useFetcher<typeof action>();
  const push = useFetcher<typeof action>();
  const [mode, setMode] = useState<"start" | "event">(plan.eventDate ? "event" : "start");
  const [form, fields] = useSchemaForm(assignSchema, fetcher.data, { id: "assign" });
  const errors = {
    athleteIds: fieldProps(fields.athleteIds).error,
    date: fieldProps(fields.date).error,
    overlap: fieldProps(fields.overlap).error,
    replaceFrom: fieldProps(fields.replaceFrom).error,
  };
  const reply = fetcher.data;
  const saved = reply && "message" in reply ? reply.message : undefined;
  const refused = messageOf(reply);
  const pushed = push.data && "message" in push.data ? push.data.message : undefined;
  const pushRefused = firstMessage(push.data);
  const reports = (reply && "reports" in reply ? reply.reports : undefined) ?? [];
  const [dismissed, setDismissed] = useState<unknown>(null);
  const asking = reports.length > 0 && dismissed !== reply;
  const outdated = assignments.filter((a) => a.outdated).length;
  return (
    <>
      <p className="mb-2 text-sm">
        <Link to={`/coach/plans/${plan.id}/board`} className="text-teal underline">
          {plan.name}
        </Link>{" "}
        / Assign
      </p>
      <PageHeader
        title="Assign to athletes"
        lead={`Places all ${weeks} weeks on each athlete's calendar, with targets from their own thresholds.`}
      />
      <div className="grid gap-6 lg:grid-cols-[1fr_22rem]">
        <Card>
          <fetcher.Form method="post" id={form.id} onSubmit={form.onSubmit} noValidate className="flex flex-col gap-4">
            {(refused ?? saved) && (dismissed !== reply || !reports.length) && (
              <FormMessage tone={refused ? "error" : "ok"}>{refused ?? saved}</FormMessage>
            )}
            {reports.length > 0 && dismissed === reply && (
              <FormMessage tone="ok">Cancelled: nothing was placed.</FormMessage>
            )}
            <table className="w-full text-left text-sm">
              <caption className="sr-only">Athletes on your roster</caption>
              <thead className="text-ink-soft">
                <tr>
                  <th className="py-1 font-medium">Assign</th>
                  <th className="py-1 font-medium">Athlete</th>
                  <th className="py-1 font-medium">Current thresholds</th>
                </tr>
              </thead>
              <tbody>
                {athletes.map((a) => (
                  <tr key={a.id} className="border-t border-line/60">
                    <td className="py-2">
                      <input type="checkbox" name="athleteIds" value={a.id} id={`athlete-${a.id}`} />
                    </td>
                    <td className="py-2">
                      <label htmlFor={`athlete-${a.id}`} className="font-medium">
                        {a.name}
                      </label>
                    </td>
                    <td className="num py-2 text-ink-soft">
                      {a.thresholds.length
                        ? a.thresholds.join(" · ")
                        : "none yet: sessions will show % until a field test"}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            {errors.athleteIds && <p className="text-sm text-brick">{errors.athleteIds}</p>}
            <fieldset className="flex flex-wrap gap-4 text-sm">
              <legend className="mb-1 font-medium">Align</legend>
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
                end in the week of an event
              </label>
            </fieldset>
            <Field
              label={mode === "start" ? "Start date" : "Event date"}
              name="date"
              type="date"
              defaultValue={mode === "event" ? (plan.eventDate ?? today) : today}
              error={errors.date}
              className="max-w-xs"
            />
            {asking && reply && "start" in reply ? (
              <PlacementChoices
                reports={reports}
                start={reply.start!}
                errors={errors}
                busy={fetcher.state !== "idle"}
                onCancel={() => setDismissed(reply)}
              />
            ) : (
              <button
                type="submit"
                className={buttonClass("primary", "self-start")}
                disabled={fetcher.state !== "idle"}
              >
                {fetcher.state !== "idle" ? "Checking…" : "Place on calendars"}
              </button>
            )}
          </fetcher.Form>
        </Card>
        <Card>
          <h2 className="font-semibold">Already assigned</h2>
          {assignments.length === 0 ? (
            <p className="mt-2 text-sm text-ink-soft">No one follows this plan yet.</p>
          ) : (
            <ul className="mt-2 flex flex-col gap-1 text-sm">
              {assignments.map((a) => (
                <li key={a.id}>
                  {a.athlete} from {a.startDate} {a.outdated && <span className="text-brick">· older version</span>}
                </li>
              ))}
            </ul>
          )}
          {outdated > 0 && (
            <push.Form method="post" className="mt-4">
              {(pushRefused ?? pushed) && (
                <FormMessage tone={pushRefused ? "error" : "ok"}>{pushRefused ?? pushed}</FormMessage>
              )}
              <p className="mt-2 text-xs text-ink-soft">
                Sessions from today on are updated; past, done and skipped ones stay as they were.
              </p>
              <button
                name="intent"
                value="push"
                className={buttonClass("secondary", "mt-2")}
                disabled={push.state !== "idle"}
              >
                Push changes to future sessions
              </button>
            </push.Form>
          )}
        </Card>
      </div>
    </>
  );
}

type Report = {
  athlete: string;
  athleteId: number;
  sportsWithoutThreshold: string[];
  overlap: { from: string; to: string; sessions: number; plans: string[] } | null;
  testDays: { date: string; names: string[] }[];
};

/** What placing would do to each calendar, and the coach's answer; nothing is written until one is given. */
function PlacementChoices({
  reports,
  start,
  errors,
  busy,
  onCancel,
}: {
  reports: Report[];
  start: string;
  errors: { overlap?: string; replaceFrom?: string };
  busy: boolean;
  onCancel: () => void;
}) {
  const overlap = reports.some((r) => r.overlap);
  const sports = [...new Set(reports.flatMap((r) => r.sportsWithoutThreshold))];
  const tests = reports.some((r) => r.testDays.length);
  const [choice, setChoice] = useState<"replace" | "alongside" | "">("");
  return (
    <section
      aria-labelledby="checks-heading"
      className="flex flex-col gap-3 rounded-xl border border-brick/40 bg-brick/5 p-4 text-sm"
      data-testid="placement-checks"
    >
      <input type="hidden" name="decided" value="1" />
      <h2 id="checks-heading" className="font-semibold">
        Before placing
      </h2>
      <ul className="flex flex-col gap-2">
        {reports.map((r) => (
          <li key={r.athleteId}>
            <span className="font-medium">{r.athlete}</span>
            <ul className="ml-4 list-disc">
              {r.sportsWithoutThreshold.length > 0 && (
                <li>
                  has no threshold for {r.sportsWithoutThreshold.join(" or ")}: those sessions would show only
                  percentages until a field test.
                </li>
              )}
              {r.overlap && (
                <li>
                  already has {r.overlap.sessions} planned session{r.overlap.sessions === 1 ? "" : "s"} between{" "}
                  {r.overlap.from} and {r.overlap.to}
                  {r.overlap.plans.length ? ` (from ${r.overlap.plans.join(", ")})` : ""}.
                </li>
              )}
              {r.testDays.map((d) => (
                <li key={d.date} className="font-medium text-brick">
                  two maximal tests on {d.date}: {d.names.join(" and ")}.
                </li>
              ))}
            </ul>
          </li>
        ))}
      </ul>
      {overlap && (
        <fieldset className="flex flex-col gap-2">
          <legend className="mb-1 font-medium">The sessions already planned</legend>
          <label className="flex flex-wrap items-center gap-2">
            <input
              type="radio"
              name="overlap"
              value="replace"
              checked={choice === "replace"}
              onChange={() => setChoice("replace")}
            />{" "}
            replace them from
            <input
              type="date"
              name="replaceFrom"
              defaultValue={start}
              aria-label="Replace from"
              className="rounded border border-line px-2 py-1"
            />
            <span className="text-ink-soft">(done and skipped sessions stay)</span>
          </label>
          <label className="flex items-center gap-2">
            <input
              type="radio"
              name="overlap"
              value="alongside"
              checked={choice === "alongside"}
              onChange={() => setChoice("alongside")}
            />{" "}
            keep them and place this plan alongside
          </label>
          {(errors.overlap || errors.replaceFrom) && (
            <p className="text-brick">{errors.overlap ?? errors.replaceFrom}</p>
          )}
        </fieldset>
      )}
      {sports.length > 0 && (
        <label className="flex items-center gap-2">
          <input type="checkbox" name="confirmSports" /> place it even without a {sports.join(" or ")} threshold
        </label>
      )}
      {tests && (
        <label className="flex items-center gap-2">
          <input type="checkbox" name="confirmTests" /> I have checked with the athlete: two maximal tests on one day
          are intended (replacing from an earlier date may remove the clash instead)
        </label>
      )}
      <div className="flex gap-2">
        <button type="submit" className={buttonClass("primary")} disabled={busy}>
          {busy ? "Placing…" : "Place with these choices"}
        </button>
        <button type="button" className={buttonClass("secondary")} onClick={onCancel}>
          Cancel
        </button>
      </div>
    </section>
  );
}
