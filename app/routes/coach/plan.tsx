import { useState } from "react";
import { data, Link, redirect, useFetcher } from "react-router";
import { PhaseRibbon } from "~/components/phase-ribbon";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { requirePlan } from "~/.server/access";
import { loaderFailure, pageFailure } from "~/.server/replies";
import { listShelfSessions } from "~/.server/services/shelf";
import {
  addRecurrence,
  deletePlan,
  editWeekRange,
  loadPlan,
  renamePlan,
  setPhaseRange,
  updateWeek,
  updateWeeks,
} from "~/.server/services/plans";
import { parseForm } from "~/lib/forms";
import { DAY_NAMES, PHASE_LABEL, phaseRangeSchema, recurrenceSchema, weekEditSchema } from "~/lib/plans";
import { addWeeks } from "~/lib/dates";
import { PHASES } from "~/lib/training";
import { z } from "zod";
import type { Route } from "./+types/plan";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.plan.name ?? "Plan"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  await requirePlan(coach, params.planId);
  try {
    const loaded = await loadPlan(coach.id, Number(params.planId));
    const shelf = await listShelfSessions(coach.id);
    return { ...loaded, shelf: shelf.map((s) => ({ id: s.id, name: s.name, sport: s.sport })) };
  } catch (err) {
    loaderFailure(err);
  }
}

const loadFactor = z.coerce
  .number({ error: "Enter a load factor." })
  .min(0.3, "Use a load factor from 0.3 to 2.")
  .max(2, "Use a load factor from 0.3 to 2.");
const bulkWeekSchema = weekEditSchema.extend({ loadFactor });
const rangeSchema = z
  .object({
    fromWeek: z.coerce.number().int().min(1, "Weeks start at 1."),
    toWeek: z.coerce.number().int().min(1, "Weeks start at 1."),
    phase: z.union([z.literal(""), z.enum(PHASES)]).default(""),
    plannedHours: z
      .union([
        z.literal(""),
        z.coerce.number({ error: "Enter hours." }).min(0, "Hours cannot be negative.").max(60, "Use at most 60 hours."),
      ])
      .default(""),
    loadFactor: z.union([z.literal(""), loadFactor]).default(""),
  })
  .refine((v) => v.toWeek >= v.fromWeek, { message: "The last week must not be before the first.", path: ["toWeek"] });

const renameSchema = z.object({
  name: z.string().trim().min(1, "Give the plan a name.").max(120),
  description: z.string().trim().max(2000).default(""),
});

type Result = { ok: boolean; message: string; fieldErrors: Record<string, string | undefined> };

export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const planId = (await requirePlan(coach, params.planId)).id;
  const form = await request.formData();
  const intent = form.get("intent");
  const fail = (message: string, status = 400, fieldErrors: Record<string, string | undefined> = {}) =>
    data<Result>({ ok: false, message, fieldErrors }, { status });
  try {
    if (intent === "week") {
      const parsed = parseForm(weekEditSchema, form);
      if (!parsed.ok) return fail("Check the week's fields.", 400, parsed.fieldErrors);
      await updateWeek(coach.id, planId, parsed.data);
      return { ok: true, message: "Week saved.", fieldErrors: {} } satisfies Result;
    }
    if (intent === "weeks") {
      // One form for the whole table: every week is checked first, and nothing is saved while any field is wrong.
      const ids = form.getAll("weekId").map(String);
      const edits = [];
      const fieldErrors: Record<string, string | undefined> = {};
      for (const id of ids) {
        const one = new FormData();
        one.set("weekId", id);
        for (const f of ["phase", "recovery", "test", "plannedHours", "loadFactor", "notes"]) {
          const v = form.get(`${f}-${id}`);
          if (v !== null) one.set(f, v);
        }
        const parsed = parseForm(bulkWeekSchema, one);
        if (parsed.ok) edits.push(parsed.data);
        else for (const [k, v] of Object.entries(parsed.fieldErrors)) fieldErrors[`${k}-${id}`] = v;
      }
      if (Object.keys(fieldErrors).length) return fail("Nothing was saved: fix the marked fields.", 400, fieldErrors);
      const n = await updateWeeks(coach.id, planId, edits);
      return {
        ok: true,
        message: n ? `Saved ${n} changed week${n === 1 ? "" : "s"}.` : "Nothing had changed.",
        fieldErrors: {},
      } satisfies Result;
    }
    if (intent === "range") {
      const parsed = parseForm(rangeSchema, form);
      if (!parsed.ok) return fail("Check the change.", 400, parsed.fieldErrors);
      const v = parsed.data;
      const n = await editWeekRange(coach.id, planId, {
        fromWeek: v.fromWeek,
        toWeek: v.toWeek,
        phase: v.phase || undefined,
        plannedHours: v.plannedHours === "" ? undefined : v.plannedHours,
        loadFactor: v.loadFactor === "" ? undefined : v.loadFactor,
      });
      return {
        ok: true,
        message: `Changed weeks ${v.fromWeek}–${v.toWeek} (${n} week${n === 1 ? "" : "s"}).`,
        fieldErrors: {},
      } satisfies Result;
    }
    if (intent === "phase-range") {
      const parsed = parseForm(phaseRangeSchema, form);
      if (!parsed.ok) return fail("Check the phase change.", 400, parsed.fieldErrors);
      const n = await setPhaseRange(coach.id, planId, parsed.data);
      return {
        ok: true,
        message: `${n} week${n === 1 ? "" : "s"} set to ${PHASE_LABEL[parsed.data.phase]}.`,
        fieldErrors: {},
      } satisfies Result;
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
    return pageFailure(err, (e): Result => ({
      ok: false,
      message: e.message,
      fieldErrors: e.field ? { [e.field]: e.message } : {},
    }));
    throw err;
  }
  return fail("Unknown request.");
}

export default function PlanPage({ loaderData }: Route.ComponentProps) {
  const { plan, weeks, items, recurrences, shelf } = loaderData;
  const dayCount = (weekId: number) => items.filter((i) => i.weekId === weekId).length;
  const monday = (idx: number) => {
    if (!plan.startDate) return `Week ${idx}`;
    return addWeeks(plan.startDate, idx - 1);
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
          <>
            <Link to={`/coach/plans/${plan.id}/print`} className={buttonClass("secondary")}>
              Print view
            </Link>
            <Link to={`/coach/plans/${plan.id}/board`} className={buttonClass("primary")}>
              Open the plan board
            </Link>
          </>
        }
      />
      <PhaseRibbon
        weeks={weeks.map((w) => ({ idx: w.idx, phase: w.phase, recovery: w.recovery, test: w.test }))}
        className="mb-6"
      />
      <div className="grid gap-6 xl:grid-cols-[1fr_22rem]">
        <WeeksForm weeks={weeks} label={monday} sessions={dayCount} version={plan.version} />
        <div className="flex flex-col gap-6">
          <RangeForm weeks={weeks.length} />
          <RecurrenceForm weeks={weeks.length} shelf={shelf} recurrences={recurrences} />
          <RenameForm name={plan.name} description={plan.description} />
        </div>
      </div>
    </>
  );
}

type WeekRowData = {
  id: number;
  idx: number;
  phase: string;
  recovery: boolean;
  test: boolean;
  plannedHours: number;
  loadFactor: number;
  notes: string;
};

/**
 * Every week in one form with one Save. A field's error belongs to the value that was sent: editing the field
 * clears it at once, without waiting for the next save.
 */
function WeeksForm({
  weeks,
  label,
  sessions,
  version,
}: {
  weeks: WeekRowData[];
  label: (idx: number) => string;
  sessions: (weekId: number) => number;
  version: number;
}) {
  const fetcher = useFetcher<Result>();
  const [edited, setEdited] = useState<Set<string>>(new Set());
  const [seen, setSeen] = useState<unknown>(null);
  if (fetcher.data !== seen) {
    setSeen(fetcher.data);
    setEdited(new Set());
  }
  const errors = fetcher.data?.fieldErrors ?? {};
  const err = (field: string, id: number) => (edited.has(`${field}-${id}`) ? undefined : errors[`${field}-${id}`]);
  const touch = (e: React.FormEvent<HTMLFormElement>) => {
    const name = (e.target as unknown as HTMLInputElement).name;
    if (name) setEdited((s) => new Set(s).add(name));
  };
  return (
    <Card className="overflow-x-auto p-0">
      <fetcher.Form method="post" onChange={touch} key={version} noValidate>
        <input type="hidden" name="intent" value="weeks" />
        <table className="num w-full min-w-[48rem] text-left text-sm">
          <caption className="px-4 pt-4 text-left font-semibold">Weeks</caption>
          <thead className="text-ink-soft">
            <tr>
              <th className="px-4 py-2 font-medium">Week</th>
              <th className="py-2 font-medium">Phase</th>
              <th className="py-2 pr-3 font-medium">Recovery</th>
              <th className="py-2 pr-3 font-medium">Test</th>
              <th className="py-2 font-medium">Hours</th>
              <th className="py-2 font-medium" title="Planned load relative to a normal loading week (1.00)">
                Load factor
              </th>
              <th className="py-2 font-medium">Notes</th>
              <th className="py-2 pr-4 font-medium">Sessions</th>
            </tr>
          </thead>
          <tbody>
            {weeks.map((w) => (
              <tr key={w.id} className="border-t border-line/60 align-top">
                <td className="px-4 py-2">
                  <input type="hidden" name="weekId" value={w.id} />
                  <span className="font-medium">{w.idx}</span>
                  <span className="block text-xs text-ink-soft">{label(w.idx)}</span>
                </td>
                <td className="py-2">
                  <select
                    name={`phase-${w.id}`}
                    defaultValue={w.phase}
                    aria-label={`Phase of week ${w.idx}`}
                    className="rounded-md border border-line bg-white py-1 pr-7 pl-2"
                  >
                    {PHASES.map((p) => (
                      <option key={p} value={p}>
                        {PHASE_LABEL[p]}
                      </option>
                    ))}
                  </select>
                </td>
                <td className="py-2">
                  <input
                    type="checkbox"
                    name={`recovery-${w.id}`}
                    defaultChecked={w.recovery}
                    aria-label={`Week ${w.idx} is a recovery week`}
                  />
                </td>
                <td className="py-2">
                  <input
                    type="checkbox"
                    name={`test-${w.id}`}
                    defaultChecked={w.test}
                    aria-label={`Week ${w.idx} has a field test`}
                  />
                </td>
                <td className="py-2">
                  <input
                    name={`plannedHours-${w.id}`}
                    type="number"
                    step="0.25"
                    min={0}
                    max={60}
                    defaultValue={w.plannedHours}
                    aria-label={`Hours of week ${w.idx}`}
                    aria-invalid={err("plannedHours", w.id) ? true : undefined}
                    className="w-20 rounded-md border border-line px-2 py-1"
                  />
                  {err("plannedHours", w.id) && (
                    <span className="block text-xs text-brick">{err("plannedHours", w.id)}</span>
                  )}
                </td>
                <td className="py-2">
                  <input
                    name={`loadFactor-${w.id}`}
                    type="number"
                    step="0.01"
                    min={0.3}
                    max={2}
                    defaultValue={w.loadFactor}
                    aria-label={`Load factor of week ${w.idx}`}
                    aria-invalid={err("loadFactor", w.id) ? true : undefined}
                    className="w-20 rounded-md border border-line px-2 py-1"
                  />
                  {err("loadFactor", w.id) && (
                    <span className="block text-xs text-brick">{err("loadFactor", w.id)}</span>
                  )}
                </td>
                <td className="py-2 pr-2">
                  <input
                    name={`notes-${w.id}`}
                    defaultValue={w.notes}
                    maxLength={1000}
                    aria-label={`Notes for week ${w.idx}`}
                    className="w-full min-w-40 rounded-md border border-line px-2 py-1"
                  />
                </td>
                <td className="py-2 pr-4">{sessions(w.id)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <div className="sticky bottom-0 flex flex-wrap items-center gap-3 border-t border-line bg-white px-4 py-3">
          <button type="submit" className={buttonClass("primary")} disabled={fetcher.state !== "idle"}>
            {fetcher.state !== "idle" ? "Saving…" : "Save all weeks"}
          </button>
          {fetcher.data && (
            <span
              role={fetcher.data.ok ? "status" : "alert"}
              className={`text-sm ${fetcher.data.ok ? "text-teal" : "text-brick"}`}
            >
              {fetcher.data.message}
            </span>
          )}
        </div>
      </fetcher.Form>
    </Card>
  );
}

/** Phase, hours and load factor for a run of weeks at once; an empty field leaves that value as it is. */
function RangeForm({ weeks }: { weeks: number }) {
  const fetcher = useFetcher<Result>();
  const errors = fetcher.data?.fieldErrors ?? {};
  const [edited, setEdited] = useState<Set<string>>(new Set());
  const [seen, setSeen] = useState<unknown>(null);
  if (fetcher.data !== seen) {
    setSeen(fetcher.data);
    setEdited(new Set());
  }
  const err = (f: string) => (edited.has(f) ? undefined : errors[f]);
  return (
    <Card>
      <h2 className="font-semibold">Change a run of weeks</h2>
      <fetcher.Form
        method="post"
        noValidate
        className="mt-3 flex flex-col gap-3 text-sm"
        onChange={(e) => setEdited((s) => new Set(s).add((e.target as unknown as HTMLInputElement).name))}
      >
        <input type="hidden" name="intent" value="range" />
        <Result result={fetcher.data} />
        <div className="grid grid-cols-2 gap-2">
          <label className="flex flex-col gap-1">
            From week
            <input
              name="fromWeek"
              type="number"
              min={1}
              max={weeks}
              defaultValue={1}
              className="rounded-md border border-line px-2 py-1"
            />
          </label>
          <label className="flex flex-col gap-1">
            To week
            <input
              name="toWeek"
              type="number"
              min={1}
              max={weeks}
              defaultValue={Math.min(4, weeks)}
              className="rounded-md border border-line px-2 py-1"
            />
            {err("toWeek") && <span className="text-xs text-brick">{err("toWeek")}</span>}
          </label>
          <label className="col-span-2 flex flex-col gap-1">
            Phase
            <select name="phase" defaultValue="" className="rounded-md border border-line bg-white py-1 pr-7 pl-2">
              <option value="">keep as it is</option>
              {PHASES.map((p) => (
                <option key={p} value={p}>
                  {PHASE_LABEL[p]}
                </option>
              ))}
            </select>
            {err("phase") && <span className="text-xs text-brick">{err("phase")}</span>}
          </label>
          <label className="flex flex-col gap-1">
            Hours per week
            <input
              name="plannedHours"
              type="number"
              step="0.25"
              min={0}
              max={60}
              placeholder="keep"
              className="rounded-md border border-line px-2 py-1"
            />
            {err("plannedHours") && <span className="text-xs text-brick">{err("plannedHours")}</span>}
          </label>
          <label className="flex flex-col gap-1">
            Load factor
            <input
              name="loadFactor"
              type="number"
              step="0.01"
              min={0.3}
              max={2}
              placeholder="keep"
              className="rounded-md border border-line px-2 py-1"
            />
            {err("loadFactor") && <span className="text-xs text-brick">{err("loadFactor")}</span>}
          </label>
        </div>
        <button className={buttonClass("secondary")} disabled={fetcher.state !== "idle"}>
          Apply to these weeks
        </button>
      </fetcher.Form>
    </Card>
  );
}

function Result({ result }: { result?: Result }) {
  if (!result) return null;
  return <FormMessage tone={result.ok ? "ok" : "error"}>{result.message}</FormMessage>;
}

function RecurrenceForm({
  weeks,
  shelf,
  recurrences,
}: {
  weeks: number;
  shelf: { id: number; name: string; sport: string }[];
  recurrences: { id: number; summary: string; count: number }[];
}) {
  const fetcher = useFetcher<Result>();
  const errors = fetcher.data?.fieldErrors ?? {};
  return (
    <Card>
      <h2 className="font-semibold">Repeat a session</h2>
      <p className="mt-1 text-xs text-ink-soft">
        Each repeat becomes its own item, which you can still move or remove on the board.
      </p>
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
            <input
              name="fromWeek"
              type="number"
              min={1}
              max={weeks}
              defaultValue={Math.min(3, weeks)}
              className="rounded-md border border-line px-2 py-1"
            />
          </label>
          <label className="flex flex-col gap-1">
            To week
            <input
              name="toWeek"
              type="number"
              min={1}
              max={weeks}
              defaultValue={Math.min(8, weeks)}
              className="rounded-md border border-line px-2 py-1"
            />
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
        <input
          name="name"
          defaultValue={name}
          aria-label="Plan name"
          className="rounded-md border border-line px-2 py-1"
        />
        <textarea
          name="description"
          defaultValue={description}
          rows={2}
          aria-label="Plan description"
          className="rounded-md border border-line px-2 py-1"
        />
        <div className="flex justify-between">
          <button name="intent" value="rename" className={buttonClass("secondary")}>
            Save
          </button>
          <button
            name="intent"
            value="delete"
            className={buttonClass("ghost", "text-brick")}
            onClick={(e) => !confirm("Delete this plan and everything on its board?") && e.preventDefault()}
          >
            Delete plan
          </button>
        </div>
      </fetcher.Form>
    </Card>
  );
}
