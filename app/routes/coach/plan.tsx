import { data, Link, redirect, useFetcher, useSearchParams } from "react-router";
import { PhaseRibbon } from "~/components/phase-ribbon";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { notFound } from "~/.server/http";
import { listSessions } from "~/.server/services/sessions";
import { addRecurrence, deletePlan, loadPlan, PlanError, renamePlan, setPhaseRange, updateWeek } from "~/.server/services/plans";
import { parseForm } from "~/lib/forms";
import { DAY_NAMES, PHASE_LABEL, phaseRangeSchema, recurrenceSchema, weekEditSchema } from "~/lib/plans";
import { PHASES } from "~/lib/training";
import { z } from "zod";
import type { Route } from "./+types/plan";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.plan.name ?? "Plan"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  try {
    const loaded = await loadPlan(coach.id, Number(params.planId));
    const shelf = await listSessions(coach.id);
    return { ...loaded, shelf: shelf.map((s) => ({ id: s.id, name: s.name, sport: s.sport })) };
  } catch (err) {
    if (err instanceof PlanError && err.status === 404) notFound(err.message);
    throw err;
  }
}

const renameSchema = z.object({ name: z.string().trim().min(1, "Give the plan a name.").max(120), description: z.string().trim().max(2000).default("") });

type Result = { ok: boolean; message: string; fieldErrors: Record<string, string | undefined> };

export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const planId = Number(params.planId);
  const form = await request.formData();
  const intent = form.get("intent");
  const fail = (message: string, status = 400, fieldErrors: Record<string, string | undefined> = {}) => data<Result>({ ok: false, message, fieldErrors }, { status });
  try {
    if (intent === "week") {
      const parsed = parseForm(weekEditSchema, form);
      if (!parsed.ok) return fail("Check the week's fields.", 400, parsed.fieldErrors);
      await updateWeek(coach.id, planId, parsed.data);
      return { ok: true, message: "Week saved.", fieldErrors: {} } satisfies Result;
    }
    if (intent === "phase-range") {
      const parsed = parseForm(phaseRangeSchema, form);
      if (!parsed.ok) return fail("Check the phase change.", 400, parsed.fieldErrors);
      const n = await setPhaseRange(coach.id, planId, parsed.data);
      return { ok: true, message: `${n} week${n === 1 ? "" : "s"} set to ${PHASE_LABEL[parsed.data.phase]}.`, fieldErrors: {} } satisfies Result;
    }
    if (intent === "recurrence") {
      const parsed = parseForm(recurrenceSchema, form);
      if (!parsed.ok) return fail("Check the repeating session.", 400, parsed.fieldErrors);
      const { recurrence, count } = await addRecurrence(coach.id, planId, parsed.data);
      return { ok: true, message: `Added ${count} sessions: ${recurrence.summary}.`, fieldErrors: {} } satisfies Result;
    }
    if (intent === "rename") {
      const parsed = parseForm(renameSchema, form);
      if (!parsed.ok) return fail("Check the name.", 400, parsed.fieldErrors);
      await renamePlan(coach.id, planId, parsed.data.name, parsed.data.description);
      return { ok: true, message: "Plan renamed.", fieldErrors: {} } satisfies Result;
    }
    if (intent === "delete") {
      await deletePlan(coach.id, planId);
      return redirect("/coach/plans");
    }
  } catch (err) {
    if (err instanceof PlanError) return fail(err.message, err.status, err.field ? { [err.field]: err.message } : {});
    throw err;
  }
  return fail("Unknown request.");
}

export default function PlanPage({ loaderData }: Route.ComponentProps) {
  const { plan, weeks, items, recurrences, shelf } = loaderData;
  const [params] = useSearchParams();
  const dayCount = (weekId: number) => items.filter((i) => i.weekId === weekId).length;
  const monday = (idx: number) => {
    if (!plan.startDate) return `Week ${idx}`;
    const d = new Date(`${plan.startDate}T00:00:00Z`);
    d.setUTCDate(d.getUTCDate() + (idx - 1) * 7);
    return d.toISOString().slice(0, 10);
  };
  return (
    <>
      <p className="mb-2 text-sm">
        <Link to="/coach/plans" className="text-teal underline">
          Season plans
        </Link>{" "}
        / {plan.name}
      </p>
      <PageHeader
        title={plan.name}
        lead={`${weeks.length} weeks · ${plan.pattern} loading · field test every ${plan.testEveryWeeks} weeks${plan.eventDate ? ` · event ${plan.eventDate}` : ""}`}
        actions={
          <Link to={`/coach/plans/${plan.id}/board`} className={buttonClass("primary")}>
            Open the plan board
          </Link>
        }
      />
      {params.get("created") && (
        <div className="mb-4">
          <FormMessage tone="ok">Plan created. Test weeks already hold a field-test session; drag the rest from your shelf on the board.</FormMessage>
        </div>
      )}
      <PhaseRibbon weeks={weeks.map((w) => ({ idx: w.idx, phase: w.phase, recovery: w.recovery, test: w.test }))} className="mb-6" />
      <div className="grid gap-6 xl:grid-cols-[1fr_22rem]">
        <Card className="overflow-x-auto p-0">
          <table className="num w-full min-w-[44rem] text-left text-sm">
            <caption className="px-4 pt-4 text-left font-semibold">Weeks</caption>
            <thead className="text-ink-soft">
              <tr>
                <th className="px-4 py-2 font-medium">Week</th>
                <th className="py-2 font-medium">Phase</th>
                <th className="py-2 font-medium">Recovery</th>
                <th className="py-2 font-medium">Test</th>
                <th className="py-2 font-medium">Hours</th>
                <th className="py-2 font-medium">Notes</th>
                <th className="py-2 font-medium">Sessions</th>
                <th className="py-2" />
              </tr>
            </thead>
            <tbody>
              {weeks.map((w) => (
                <WeekRow key={`${w.id}-${plan.version}`} week={w} label={monday(w.idx)} sessions={dayCount(w.id)} />
              ))}
            </tbody>
          </table>
        </Card>
        <div className="flex flex-col gap-6">
          <PhaseRangeForm weeks={weeks.length} />
          <RecurrenceForm weeks={weeks.length} shelf={shelf} recurrences={recurrences} />
          <RenameForm name={plan.name} description={plan.description} />
        </div>
      </div>
    </>
  );
}

function WeekRow({ week, label, sessions }: { week: { id: number; idx: number; phase: string; recovery: boolean; test: boolean; plannedHours: number; notes: string }; label: string; sessions: number }) {
  const fetcher = useFetcher<Result>();
  const errors = fetcher.data?.fieldErrors ?? {};
  const formId = `week-${week.id}`;
  return (
    <tr className="border-t border-line/60 align-top">
      <td className="px-4 py-2">
        <span className="font-medium">{week.idx}</span>
        <span className="block text-xs text-ink-soft">{label}</span>
        <fetcher.Form method="post" id={formId}>
          <input type="hidden" name="intent" value="week" />
          <input type="hidden" name="weekId" value={week.id} />
        </fetcher.Form>
      </td>
      <td className="py-2">
        <select name="phase" form={formId} defaultValue={week.phase} aria-label={`Phase of week ${week.idx}`} className="rounded-md border border-line bg-white px-2 py-1">
          {PHASES.map((p) => (
            <option key={p} value={p}>
              {PHASE_LABEL[p]}
            </option>
          ))}
        </select>
      </td>
      <td className="py-2">
        <input type="checkbox" name="recovery" form={formId} defaultChecked={week.recovery} aria-label={`Week ${week.idx} is a recovery week`} />
      </td>
      <td className="py-2">
        <input type="checkbox" name="test" form={formId} defaultChecked={week.test} aria-label={`Week ${week.idx} has a field test`} />
      </td>
      <td className="py-2">
        <input name="plannedHours" form={formId} type="number" step="0.25" min={0} max={60} defaultValue={week.plannedHours} aria-label={`Hours of week ${week.idx}`} className="w-20 rounded-md border border-line px-2 py-1" />
        {errors.plannedHours && <span className="block text-xs text-brick">{errors.plannedHours}</span>}
      </td>
      <td className="py-2 pr-2">
        <input name="notes" form={formId} defaultValue={week.notes} maxLength={1000} aria-label={`Notes for week ${week.idx}`} className="w-full min-w-40 rounded-md border border-line px-2 py-1" />
      </td>
      <td className="py-2">{sessions}</td>
      <td className="py-2 pr-4">
        <button type="submit" form={formId} className={buttonClass("secondary", "px-3 py-1")} disabled={fetcher.state !== "idle"}>
          {fetcher.state !== "idle" ? "…" : "Save"}
        </button>
        {fetcher.data && (
          <span role="status" className={`block text-xs ${fetcher.data.ok ? "text-teal" : "text-brick"}`}>
            {fetcher.data.message}
          </span>
        )}
      </td>
    </tr>
  );
}

function Result({ result }: { result?: Result }) {
  if (!result) return null;
  return <FormMessage tone={result.ok ? "ok" : "error"}>{result.message}</FormMessage>;
}

function PhaseRangeForm({ weeks }: { weeks: number }) {
  const fetcher = useFetcher<Result>();
  const errors = fetcher.data?.fieldErrors ?? {};
  return (
    <Card>
      <h2 className="font-semibold">Resize a phase</h2>
      <fetcher.Form method="post" className="mt-3 flex flex-col gap-3 text-sm">
        <input type="hidden" name="intent" value="phase-range" />
        <Result result={fetcher.data} />
        <div className="grid grid-cols-3 gap-2">
          <label className="flex flex-col gap-1">
            Phase
            <select name="phase" className="rounded-md border border-line bg-white px-2 py-1">
              {PHASES.map((p) => (
                <option key={p} value={p}>
                  {PHASE_LABEL[p]}
                </option>
              ))}
            </select>
          </label>
          <label className="flex flex-col gap-1">
            From week
            <input name="fromWeek" type="number" min={1} max={weeks} defaultValue={1} className="rounded-md border border-line px-2 py-1" />
          </label>
          <label className="flex flex-col gap-1">
            To week
            <input name="toWeek" type="number" min={1} max={weeks} defaultValue={Math.min(4, weeks)} className="rounded-md border border-line px-2 py-1" />
            {errors.toWeek && <span className="text-xs text-brick">{errors.toWeek}</span>}
          </label>
        </div>
        <button className={buttonClass("secondary")}>Apply</button>
      </fetcher.Form>
    </Card>
  );
}

function RecurrenceForm({ weeks, shelf, recurrences }: { weeks: number; shelf: { id: number; name: string; sport: string }[]; recurrences: { id: number; summary: string; count: number }[] }) {
  const fetcher = useFetcher<Result>();
  const errors = fetcher.data?.fieldErrors ?? {};
  return (
    <Card>
      <h2 className="font-semibold">Repeat a session</h2>
      <p className="mt-1 text-xs text-ink-soft">Each repeat becomes its own item, which you can still move or remove on the board.</p>
      <fetcher.Form method="post" className="mt-3 flex flex-col gap-3 text-sm">
        <input type="hidden" name="intent" value="recurrence" />
        <Result result={fetcher.data} />
        <label className="flex flex-col gap-1">
          Session
          <select name="sessionId" className="rounded-md border border-line bg-white px-2 py-1">
            {shelf.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
          {errors.sessionId && <span className="text-xs text-brick">{errors.sessionId}</span>}
        </label>
        <fieldset>
          <legend>Days</legend>
          <div className="mt-1 flex flex-wrap gap-2">
            {DAY_NAMES.map((d, i) => (
              <label key={d} className="flex items-center gap-1">
                <input type="checkbox" name="days" value={i} defaultChecked={i === 1 || i === 3} /> {d}
              </label>
            ))}
          </div>
          {errors.days && <span className="text-xs text-brick">{errors.days}</span>}
        </fieldset>
        <div className="grid grid-cols-3 gap-2">
          <label className="flex flex-col gap-1">
            From week
            <input name="fromWeek" type="number" min={1} max={weeks} defaultValue={Math.min(3, weeks)} className="rounded-md border border-line px-2 py-1" />
          </label>
          <label className="flex flex-col gap-1">
            To week
            <input name="toWeek" type="number" min={1} max={weeks} defaultValue={Math.min(8, weeks)} className="rounded-md border border-line px-2 py-1" />
            {errors.toWeek && <span className="text-xs text-brick">{errors.toWeek}</span>}
          </label>
          <label className="flex flex-col gap-1">
            Time
            <input name="timeOfDay" type="time" className="rounded-md border border-line px-2 py-1" />
            {errors.timeOfDay && <span className="text-xs text-brick">{errors.timeOfDay}</span>}
          </label>
        </div>
        <button className={buttonClass("secondary")} disabled={fetcher.state !== "idle"}>
          Add repeats
        </button>
      </fetcher.Form>
      {recurrences.length > 0 && (
        <ul className="mt-4 flex flex-col gap-1 text-sm">
          {recurrences.map((r) => (
            <li key={r.id}>
              {r.summary} <span className="text-ink-soft">({r.count} on the board)</span>
            </li>
          ))}
        </ul>
      )}
    </Card>
  );
}

function RenameForm({ name, description }: { name: string; description: string }) {
  const fetcher = useFetcher<Result>();
  return (
    <Card>
      <h2 className="font-semibold">Name and description</h2>
      <fetcher.Form method="post" className="mt-3 flex flex-col gap-3 text-sm">
        <Result result={fetcher.data} />
        <input name="name" defaultValue={name} aria-label="Plan name" className="rounded-md border border-line px-2 py-1" />
        <textarea name="description" defaultValue={description} rows={2} aria-label="Plan description" className="rounded-md border border-line px-2 py-1" />
        <div className="flex justify-between">
          <button name="intent" value="rename" className={buttonClass("secondary")}>
            Save
          </button>
          <button name="intent" value="delete" className={buttonClass("ghost", "text-brick")} onClick={(e) => !confirm("Delete this plan and everything on its board?") && e.preventDefault()}>
            Delete plan
          </button>
        </div>
      </fetcher.Form>
    </Card>
  );
}
