import { useMemo, useState } from "react";
import { Form, useNavigation } from "react-router";
import { PhaseRibbon } from "~/components/phase-ribbon";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage, SelectField } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { createPlan } from "~/.server/services/plans";
import { redirectWithToast } from "~/.server/flash";
import { formFailure } from "~/.server/replies";
import { fieldProps, parseSubmission, refuse, useSchemaForm } from "~/lib/forms";
import { newPlanSchema, PHASE_LABEL } from "~/lib/plans";
import { seasonSkeleton, TrainingInputError } from "~/lib/training";
import type { Route } from "./+types/plan-new";
import { addWeeks, todayIn } from "~/lib/dates";

export const meta: Route.MetaFunction = () => [{ title: "New season plan · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const inSixteenWeeks = addWeeks(todayIn((await requireRole(request, "coach")).timezone), 16);
  return { defaultDate: inSixteenWeeks };
}

export async function action({ request }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const submission = parseSubmission(await request.formData(), newPlanSchema);
  if (submission.status !== "success") return refuse(submission);
  try {
    const plan = await createPlan(coach.id, submission.value);
    return redirectWithToast(
      request,
      `/coach/plans/${plan.id}`,
      "Plan created. Test weeks already hold a field-test session; drag the rest from your shelf on the board.",
    );
  } catch (err) {
    return formFailure(err, submission, { field: "date" });
  }
}

export default function NewPlan({ loaderData, actionData }: Route.ComponentProps) {
  const [form, fields] = useSchemaForm(newPlanSchema, actionData);
  const v = (actionData?.initialValue ?? {}) as Record<string, string | undefined>;
  const errors = Object.fromEntries(Object.entries(fields).map(([k, f]) => [k, f.errors?.[0]])) as Record<
    keyof typeof fields,
    string | undefined
  >;
  const [alignment, setAlignment] = useState(v.alignment ?? "event");
  const [date, setDate] = useState(v.date ?? loaderData.defaultDate);
  const [weeks, setWeeks] = useState(v.weeks ?? "16");
  const [hours, setHours] = useState(v.weeklyHours ?? "8");
  const [pattern, setPattern] = useState(v.pattern ?? "3:1");
  const [testEvery, setTestEvery] = useState(v.testEveryWeeks ?? "6");
  const busy = useNavigation().state === "submitting";

  // The same engine the server uses draws the preview, so what you see is what gets created.
  const preview = useMemo(() => {
    try {
      return {
        ok: true as const,
        ...seasonSkeleton({
          ...(alignment === "event" ? { eventDate: date } : { startDate: date }),
          weeks: Number(weeks),
          weeklyHours: Number(hours),
          pattern: pattern as "3:1" | "2:1",
          testEveryWeeks: Number(testEvery),
        }),
      };
    } catch (err) {
      return { ok: false as const, message: err instanceof TrainingInputError ? err.message : "Check the fields." };
    }
  }, [alignment, date, weeks, hours, pattern, testEvery]);

  return (
    <>
      <PageHeader
        title="New season plan"
        lead="Start from an event date (or a start date); the skeleton fills in phases, recovery and test weeks."
      />
      <div className="grid gap-6 lg:grid-cols-[24rem_1fr]">
        <Card>
          <Form method="post" id={form.id} onSubmit={form.onSubmit} className="flex flex-col gap-4" noValidate>
            {form.errors?.[0] && <FormMessage>{form.errors[0]}</FormMessage>}
            <Field label="Plan name" required {...fieldProps(fields.name)} />
            <SelectField label="Sport" name="sport" defaultValue={v.sport ?? "bike"} error={errors.sport}>
              <option value="bike">Bike</option>
              <option value="run">Run</option>
              <option value="swim">Swim</option>
              <option value="multi">Multisport</option>
            </SelectField>
            <fieldset className="flex flex-col gap-2">
              <legend className="text-sm font-medium">Align the plan to</legend>
              <div className="flex gap-4 text-sm">
                <label className="flex items-center gap-2">
                  <input
                    type="radio"
                    name="alignment"
                    value="event"
                    checked={alignment === "event"}
                    onChange={() => setAlignment("event")}
                  />{" "}
                  an event date
                </label>
                <label className="flex items-center gap-2">
                  <input
                    type="radio"
                    name="alignment"
                    value="start"
                    checked={alignment === "start"}
                    onChange={() => setAlignment("start")}
                  />{" "}
                  a start date
                </label>
              </div>
            </fieldset>
            <Field
              label={alignment === "event" ? "Event date" : "Start date"}
              name="date"
              type="date"
              value={date}
              onChange={(e) => setDate(e.target.value)}
              error={errors.date}
              required
            />
            <div className="grid grid-cols-2 gap-3">
              <Field
                label="Weeks"
                name="weeks"
                type="number"
                min={4}
                max={104}
                value={weeks}
                onChange={(e) => setWeeks(e.target.value)}
                error={errors.weeks}
              />
              <Field
                label="Weekly hours"
                name="weeklyHours"
                type="number"
                step="0.5"
                min={1}
                max={40}
                value={hours}
                onChange={(e) => setHours(e.target.value)}
                error={errors.weeklyHours}
              />
              <SelectField
                label="Loading pattern"
                name="pattern"
                value={pattern}
                onChange={(e) => setPattern(e.target.value)}
                error={errors.pattern}
                className="col-span-2"
              >
                <option value="3:1">3 weeks up, 1 easy</option>
                <option value="2:1">2 weeks up, 1 easy</option>
              </SelectField>
              <Field
                label="Field test every (weeks)"
                name="testEveryWeeks"
                type="number"
                min={4}
                max={8}
                value={testEvery}
                onChange={(e) => setTestEvery(e.target.value)}
                error={errors.testEveryWeeks}
              />
            </div>
            <label className="flex flex-col gap-1 text-sm">
              <span className="font-medium">Description (optional)</span>
              <textarea
                name="description"
                rows={2}
                defaultValue={v.description}
                className="rounded-lg border border-line px-3 py-2"
              />
            </label>
            <button type="submit" className={buttonClass("primary", "py-2.5")} disabled={busy || !preview.ok}>
              {busy ? "Creating…" : "Create the plan"}
            </button>
          </Form>
        </Card>
        <Card aria-labelledby="preview-heading">
          <h2 id="preview-heading" className="font-semibold">
            Skeleton preview
          </h2>
          {preview.ok ? (
            <>
              <p className="mt-1 text-sm text-ink-soft">
                {preview.weeks.length} weeks from Monday {preview.startDate}
                {preview.eventDate ? `, event on ${preview.eventDate}` : ""}.
              </p>
              <PhaseRibbon
                weeks={preview.weeks.map((w) => ({ idx: w.index, phase: w.phase, recovery: w.recovery, test: w.test }))}
                className="mt-4"
              />
              <div className="mt-4 overflow-x-auto">
                <table className="num w-full min-w-[28rem] text-left text-sm">
                  <thead className="text-ink-soft">
                    <tr>
                      <th className="py-1 font-medium">Week</th>
                      <th className="py-1 font-medium">Monday</th>
                      <th className="py-1 font-medium">Phase</th>
                      <th className="py-1 font-medium">Load</th>
                      <th className="py-1 font-medium">Hours</th>
                      <th className="py-1 font-medium">Notes</th>
                    </tr>
                  </thead>
                  <tbody>
                    {preview.weeks.map((w) => (
                      <tr key={w.index} className="border-t border-line/60">
                        <td className="py-1">{w.index}</td>
                        <td className="py-1">{w.startDate}</td>
                        <td className="py-1">{PHASE_LABEL[w.phase]}</td>
                        <td className="py-1">
                          <span
                            className="inline-block h-2 rounded bg-teal align-middle"
                            style={{ width: `${w.loadFactor * 60}px` }}
                          />{" "}
                          {w.loadFactor.toFixed(2)}
                        </td>
                        <td className="py-1">{w.hours}</td>
                        <td className="py-1 text-ink-soft">
                          {[w.recovery && "recovery", w.test && "field test"].filter(Boolean).join(", ")}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </>
          ) : (
            <p className="mt-2 text-sm text-brick">{preview.message}</p>
          )}
        </Card>
      </div>
    </>
  );
}
