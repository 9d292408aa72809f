import { useState } from "react";
import { data, Link, useFetcher } from "react-router";
import { z } from "zod";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { notFound } from "~/.server/http";
import { Assignment, User } from "~/.server/models";
import { rosterFor } from "~/.server/services/accounts";
import { AssignError, assignPlan, pushPlanChanges } from "~/.server/services/materialize";
import { loadPlan, PlanError } from "~/.server/services/plans";
import { currentThresholds } from "~/.server/services/thresholds";
import { isIsoDate, todayIn } from "~/lib/dates";
import { parseForm } from "~/lib/forms";
import type { Route } from "./+types/assign";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Assign · ${data?.plan.name ?? "Plan"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  let loaded;
  try {
    loaded = await loadPlan(coach.id, Number(params.planId));
  } catch (err) {
    if (err instanceof PlanError) notFound(err.message);
    throw err;
  }
  const { athletes } = await rosterFor(coach.id);
  const today = todayIn(coach.timezone);
  const assignments = await Assignment.findAll({ where: { planId: loaded.plan.id }, order: [["createdAt", "DESC"]] });
  const rows = await Promise.all(
    athletes.map(async (a) => {
      const th = await currentThresholds(a.id, today);
      return { id: a.id, name: a.name, thresholds: th.map((t) => `${t.sport} ${t.metric === "power" ? `${Math.round(t.value)} W` : t.metric === "heart_rate" ? `${Math.round(t.value)} bpm` : `${Math.round(t.value)} s`}`) };
    }),
  );
  const names = new Map(athletes.map((a) => [a.id, a.name]));
  return {
    plan: loaded.plan,
    weeks: loaded.weeks.length,
    athletes: rows,
    today,
    assignments: assignments.map((a) => ({ id: a.id, athlete: names.get(a.athleteId) ?? "—", startDate: a.startDate, outdated: a.planVersion < loaded.plan.version })),
  };
}

const assignSchema = z.object({
  athleteIds: z.preprocess((v) => (v === undefined ? [] : Array.isArray(v) ? v : [v]), z.array(z.coerce.number().int().positive()).min(1, "Tick at least one athlete.")),
  mode: z.enum(["start", "event"], { error: "Choose how to align the plan." }),
  date: z.string().refine(isIsoDate, "Choose a date."),
});

export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const planId = Number(params.planId);
  const form = await request.formData();
  try {
    if (form.get("intent") === "push") {
      const r = await pushPlanChanges(coach, planId);
      return { ok: true as const, message: `Pushed the current plan to ${r.assignments} calendar${r.assignments === 1 ? "" : "s"}: ${r.updated} future session${r.updated === 1 ? "" : "s"} updated.`, fieldErrors: {} };
    }
    const parsed = parseForm(assignSchema, form);
    if (!parsed.ok) return data({ ok: false as const, message: "Check the form.", fieldErrors: parsed.fieldErrors }, { status: 400 });
    const r = await assignPlan(coach, planId, parsed.data.athleteIds, parsed.data);
    const total = r.results.reduce((s, x) => s + x.sessions, 0);
    const names = (await User.findAll({ where: { id: parsed.data.athleteIds } })).map((u) => u.name).join(", ");
    return { ok: true as const, message: `Placed ${total} sessions for ${names}, starting Monday ${r.start}.`, fieldErrors: {} };
  } catch (err) {
    if (err instanceof AssignError) return data({ ok: false as const, message: err.message, fieldErrors: {} }, { status: err.status });
    throw err;
  }
}

export default function Assign({ loaderData }: Route.ComponentProps) {
  const { plan, athletes, assignments, today, weeks } = loaderData;
  const fetcher = useFetcher<typeof action>();
  const push = useFetcher<typeof action>();
  const [mode, setMode] = useState<"start" | "event">(plan.eventDate ? "event" : "start");
  const errors: Record<string, string | undefined> = fetcher.data?.fieldErrors ?? {};
  const outdated = assignments.filter((a) => a.outdated).length;
  return (
    <>
      <p className="mb-2 text-sm">
        <Link to={`/coach/plans/${plan.id}/board`} className="text-teal underline">
          {plan.name}
        </Link>{" "}
        / Assign
      </p>
      <PageHeader title="Assign to athletes" lead={`Places all ${weeks} weeks on each athlete's calendar, with targets from their own thresholds.`} />
      <div className="grid gap-6 lg:grid-cols-[1fr_22rem]">
        <Card>
          <fetcher.Form method="post" className="flex flex-col gap-4">
            {fetcher.data && <FormMessage tone={fetcher.data.ok ? "ok" : "error"}>{fetcher.data.message}</FormMessage>}
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
                    <td className="num py-2 text-ink-soft">{a.thresholds.length ? a.thresholds.join(" · ") : "none yet: sessions will show % until a field test"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            {errors.athleteIds && <p className="text-sm text-brick">{errors.athleteIds}</p>}
            <fieldset className="flex flex-wrap gap-4 text-sm">
              <legend className="mb-1 font-medium">Align</legend>
              <label className="flex items-center gap-2">
                <input type="radio" name="mode" value="start" checked={mode === "start"} onChange={() => setMode("start")} /> start on the Monday on or after
              </label>
              <label className="flex items-center gap-2">
                <input type="radio" name="mode" value="event" checked={mode === "event"} onChange={() => setMode("event")} /> end in the week of an event
              </label>
            </fieldset>
            <Field label={mode === "start" ? "Start date" : "Event date"} name="date" type="date" defaultValue={mode === "event" ? (plan.eventDate ?? today) : today} error={errors.date} className="max-w-xs" />
            <button type="submit" className={buttonClass("primary", "self-start")} disabled={fetcher.state !== "idle"}>
              {fetcher.state !== "idle" ? "Placing…" : "Place on calendars"}
            </button>
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
              {push.data && <FormMessage tone={push.data.ok ? "ok" : "error"}>{push.data.message}</FormMessage>}
              <p className="mt-2 text-xs text-ink-soft">Sessions from today on are updated; past, done and skipped ones stay as they were.</p>
              <button name="intent" value="push" className={buttonClass("secondary", "mt-2")} disabled={push.state !== "idle"}>
                Push changes to future sessions
              </button>
            </push.Form>
          )}
        </Card>
      </div>
    </>
  );
}
