import { useMemo } from "react";
import { Link, redirect, useFetcher } from "react-router";
import { PhaseRibbon } from "~/components/phase-ribbon";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { requirePlan } from "~/.server/access";
import { jsonFormFailure, loaderFailure, submitForm } from "~/.server/replies";
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
import { fieldProps, type FormReply, jsonRefusal, messageOf, useSchemaForm } from "~/lib/forms";
import {
  DAY_NAMES,
  NOTHING_SAVED,
  PHASE_LABEL,
  phaseRangeSchema,
  rangeSchema,
  recurrenceSchema,
  renameSchema,
  weekEditSchema,
  weekTableEdits,
  weekTableSchema,
} from "~/lib/plans";
import { addWeeks } from "~/lib/dates";
import { PHASES } from "~/lib/training";
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

export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const planId = (await requirePlan(coach, params.planId)).id;
  const form = await request.formData();
  const intent = form.get("intent");
  const plural = (n: number) => `${n} week${n === 1 ? "" : "s"}`;
  if (intent === "week")
    return submitForm(form, weekEditSchema, "Check the week's fields.", async (v) => {
      await updateWeek(coach.id, planId, v);
      return "Week saved.";
    });
  if (intent === "weeks") {
    const ids = form.getAll("weekId").map(Number);
    return submitForm(form, weekTableSchema(ids), NOTHING_SAVED, async (v) => {
      const n = await updateWeeks(coach.id, planId, weekTableEdits(ids, v));
      return n ? `Saved ${n} changed week${n === 1 ? "" : "s"}.` : "Nothing had changed.";
    });
  }
  if (intent === "range")
    return submitForm(form, rangeSchema, "Check the change.", async (v) => {
      const n = await editWeekRange(coach.id, planId, {
        fromWeek: v.fromWeek,
        toWeek: v.toWeek,
        phase: v.phase || undefined,
        plannedHours: v.plannedHours === "" ? undefined : v.plannedHours,
        loadFactor: v.loadFactor === "" ? undefined : v.loadFactor,
      });
      return `Changed weeks ${v.fromWeek}–${v.toWeek} (${plural(n)}).`;
    });
  if (intent === "phase-range")
    return submitForm(form, phaseRangeSchema, "Check the phase change.", async (v) => {
      const n = await setPhaseRange(coach.id, planId, v);
      return `${plural(n)} set to ${PHASE_LABEL[v.phase]}.`;
    });
  if (intent === "recurrence")
    return submitForm(form, recurrenceSchema, "Check the repeating session.", async (v) => {
      const { recurrence, count } = await addRecurrence(coach.id, planId, v);
      return `Added ${count} sessions: ${recurrence.summary}.`;
    });
  if (intent === "rename")
    return submitForm(form, renameSchema, "Check the name.", async (v) => {
      await renamePlan(coach.id, planId, v.name, v.description);
      return "Plan renamed.";
    });
  if (intent === "delete") {
    try {
      await deletePlan(coach.id, planId);
    } catch (err) {
      return jsonFormFailure(err);
    }
    return redirect("/coach/plans");
  }
  return jsonRefusal("Unknown request.");
}

/** What a reply says above or beside its form: the saved note, or the form's own refusal. */
function ReplyNote({ reply }: { reply: FormReply | undefined }) {
  const saved = reply && "message" in reply ? (reply.message as string | undefined) : undefined;
  const refused = messageOf(reply);
  if (!refused && !saved) return null;
  return <FormMessage tone={refused ? "error" : "ok"}>{refused ?? saved}</FormMessage>;
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
  const fetcher = useFetcher<typeof action>();
  const schema = useMemo(() => weekTableSchema(weeks.map((w) => w.id)), [weeks]);
  const [form, fields] = useSchemaForm(schema, fetcher.data, { id: `weeks-${version}` });
  const err = (field: string, id: number) => fields[`${field}-${id}`]?.errors?.[0];
  const saved = fetcher.data && "message" in fetcher.data ? fetcher.data.message : undefined;
  // The browser's check stops a wrong table before it is sent, so it says the action's words itself.
  const refused = messageOf(fetcher.data) ?? (form.status === "error" && !form.valid ? NOTHING_SAVED : undefined);
  const note = refused ?? (fetcher.state === "idle" ? saved : undefined);
  return (
    <Card className="overflow-x-auto p-0">
      <fetcher.Form method="post" id={form.id} onSubmit={form.onSubmit} key={version} noValidate>
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
          {note && (
            <span role={refused ? "alert" : "status"} className={`text-sm ${refused ? "text-brick" : "text-teal"}`}>
              {note}
            </span>
          )}
        </div>
      </fetcher.Form>
    </Card>
  );
}

/** Phase, hours and load factor for a run of weeks at once; an empty field leaves that value as it is. */
function RangeForm({ weeks }: { weeks: number }) {
  const fetcher = useFetcher<typeof action>();
  const [form, fields] = useSchemaForm(rangeSchema, fetcher.data, { id: "range" });
  const err = (f: keyof typeof fields) => fieldProps(fields[f]).error;
  return (
    <Card>
      <h2 className="font-semibold">Change a run of weeks</h2>
      <fetcher.Form
        method="post"
        id={form.id}
        onSubmit={form.onSubmit}
        noValidate
        className="mt-3 flex flex-col gap-3 text-sm"
      >
        <input type="hidden" name="intent" value="range" />
        <ReplyNote reply={fetcher.data} />
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

function RecurrenceForm({
  weeks,
  shelf,
  recurrences,
}: {
  weeks: number;
  shelf: { id: number; name: string; sport: string }[];
  recurrences: { id: number; summary: string; count: number }[];
}) {
  const fetcher = useFetcher<typeof action>();
  const [form, fields] = useSchemaForm(recurrenceSchema, fetcher.data, { id: "recurrence" });
  const errors = {
    sessionId: fieldProps(fields.sessionId).error,
    days: fieldProps(fields.days).error,
    toWeek: fieldProps(fields.toWeek).error,
    timeOfDay: fieldProps(fields.timeOfDay).error,
  };
  return (
    <Card>
      <h2 className="font-semibold">Repeat a session</h2>
      <p className="mt-1 text-xs text-ink-soft">
        Each repeat becomes its own item, which you can still move or remove on the board.
      </p>
      <fetcher.Form
        method="post"
        id={form.id}
        onSubmit={form.onSubmit}
        noValidate
        className="mt-3 flex flex-col gap-3 text-sm"
      >
        <input type="hidden" name="intent" value="recurrence" />
        <ReplyNote reply={fetcher.data} />
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
  const fetcher = useFetcher<typeof action>();
  const [form, fields] = useSchemaForm(renameSchema, fetcher.data, { id: "rename" });
  const nameError = fieldProps(fields.name).error;
  return (
    <Card>
      <h2 className="font-semibold">Name and description</h2>
      <fetcher.Form
        method="post"
        id={form.id}
        onSubmit={form.onSubmit}
        noValidate
        className="mt-3 flex flex-col gap-3 text-sm"
      >
        <ReplyNote reply={fetcher.data} />
        <input
          name="name"
          defaultValue={name}
          aria-label="Plan name"
          aria-invalid={nameError ? true : undefined}
          className="rounded-md border border-line px-2 py-1"
        />
        {nameError && <span className="text-xs text-brick">{nameError}</span>}
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
            formNoValidate
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
