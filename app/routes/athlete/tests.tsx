import { useState } from "react";
import { Link, useFetcher } from "react-router";
import { ThresholdChart } from "~/components/threshold-chart";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireAthleteSubject } from "~/.server/access";
import { formFailure } from "~/.server/replies";
import { undoTestSchema, crossCheckSchema } from "~/lib/field-tests";
import { accepted, firstMessage, parseSubmission, refuse } from "~/lib/forms";
import { testHistory, undoTest } from "~/.server/services/field-test-history";
import { BandTable } from "~/components/band-table";
import { bandSetsFor } from "~/.server/services/bands";
import { bandTable, formatThreshold as show, THRESHOLD_LABEL } from "~/lib/band-table";
import { bandSetKeyFor, type Metric } from "~/lib/training";
import { applyCrossCheck, crossChecksFor } from "~/.server/services/cross-check";
import { CrossCheckCard } from "~/components/cross-check-card";
import { runningPacesFor } from "~/.server/services/running-paces";
import { RunningPacesCard } from "~/components/running-paces";
import type { Route } from "./+types/tests";

export const meta: Route.MetaFunction = () => [{ title: "Field tests · Pacewright" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { athlete, base, viewer } = await requireAthleteSubject(request, params.athleteId);
  const history = await testHistory(athlete.id);
  const latest = new Map<string, (typeof history.thresholds)[number]>();
  for (const t of history.thresholds) latest.set(`${t.sport}:${t.metric}`, t);
  const sets = await bandSetsFor(athlete);
  const zones = [...latest.values()].flatMap(
    (t) => bandTable(t, sets[bandSetKeyFor(t.sport, t.metric as Metric)]) ?? [],
  );
  return {
    athlete: { id: athlete.id, name: athlete.name },
    base,
    forCoach: viewer.id !== athlete.id,
    ...history,
    current: [...latest.values()],
    zones,
    crossChecks: await crossChecksFor(athlete.id),
    runningPaces: await runningPacesFor(athlete.id),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { athlete, viewer } = await requireAthleteSubject(request, params.athleteId);
  const form = await request.formData();
  if (form.get("intent") === "cross-check") {
    const submission = parseSubmission(form, crossCheckSchema);
    if (submission.status !== "success") return refuse(submission);
    try {
      const { confirmed, ...pick } = submission.value;
      const r = await applyCrossCheck(athlete, viewer, { ...pick, confirmed: confirmed === "1" });
      return accepted(
        submission,
        `Threshold set to ${r.value} from the cross-check; ${r.report.sessionsChanged} sessions rescaled.`,
      );
    } catch (err) {
      // A large change asks for the tick: the service names it `confirm`, and its message sits beside the checkbox.
      return formFailure(err, submission);
    }
  }
  const submission = parseSubmission(form, undoTestSchema);
  if (submission.status !== "success") return refuse(submission);
  try {
    const { undo } = await undoTest(athlete, viewer, submission.value.testId);
    return accepted(
      submission,
      `Test removed: ${undo?.sessionsChanged ?? 0} sessions are back on their previous targets. A correction has been e-mailed to the athlete and coach.`,
    );
  } catch (err) {
    return formFailure(err, submission);
  }
}

const LABEL = THRESHOLD_LABEL;

export default function Tests({ loaderData }: Route.ComponentProps) {
  const { athlete, base, forCoach, tests, thresholds, current, zones } = loaderData;
  const undo = useFetcher<typeof action>();
  const series = [...new Set(thresholds.map((t) => `${t.sport}:${t.metric}`))];
  const [shown, setShown] = useState(series[0] ?? "");
  const points = thresholds
    .filter((t) => `${t.sport}:${t.metric}` === shown)
    .map((t) => ({ date: t.effectiveFrom, value: t.value, source: t.source }));
  return (
    <>
      <PageHeader
        title={forCoach ? `${athlete.name}: field tests` : "Field tests and thresholds"}
        lead="Each saved test sets a threshold from its date; every planned session from then on follows it."
        actions={
          <Link to={`${base}/tests/new`} className={buttonClass("primary")}>
            Log a field test
          </Link>
        }
      />
      {loaderData.crossChecks.map((pair) => (
        <div key={`${pair.sport}:${pair.metric}`} className="mb-6">
          <CrossCheckCard pair={pair} />
        </div>
      ))}
      {undo.data && (
        <div className="mb-4">
          {undo.data.status === "success" && "message" in undo.data ? (
            <FormMessage tone="ok">{undo.data.message}</FormMessage>
          ) : (
            <FormMessage tone="error">{firstMessage(undo.data) ?? "The test could not be undone."}</FormMessage>
          )}
        </div>
      )}
      <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,1fr)_22rem]">
        <div className="flex min-w-0 flex-col gap-6">
          <Card>
            <div className="flex flex-wrap items-center justify-between gap-2">
              <h2 className="font-semibold">Threshold history</h2>
              {series.length > 1 && (
                <select
                  value={shown}
                  onChange={(e) => setShown(e.target.value)}
                  aria-label="Which threshold"
                  className="rounded border border-line bg-white px-2 py-1 text-sm"
                >
                  {series.map((s) => (
                    <option key={s} value={s}>
                      {LABEL[s] ?? s}
                    </option>
                  ))}
                </select>
              )}
            </div>
            {points.length ? (
              <ThresholdChart points={points} unit={thresholds.find((t) => `${t.sport}:${t.metric}` === shown)!.unit} />
            ) : (
              <p className="mt-2 text-sm text-ink-soft">No thresholds yet: log a field test.</p>
            )}
            {points.length > 0 && (
              <ol
                className="num mt-3 flex flex-col divide-y divide-line/60 text-sm"
                data-testid="threshold-basis"
                aria-label="Where each threshold came from"
              >
                {thresholds
                  .filter((t) => `${t.sport}:${t.metric}` === shown)
                  .reverse()
                  .map((t) => (
                    <li
                      key={t.id}
                      className="grid grid-cols-[6.5rem_5.5rem_1fr] gap-2 py-1.5 max-sm:grid-cols-[6.5rem_1fr]"
                    >
                      <span className="text-ink-soft">{t.effectiveFrom}</span>
                      <span className="font-medium">{t.display}</span>
                      <span className="text-ink-soft max-sm:col-span-2">{t.basis}</span>
                    </li>
                  ))}
              </ol>
            )}
          </Card>
          <Card className="overflow-x-auto">
            <h2 className="font-semibold">Tests</h2>
            {tests.length === 0 ? (
              <p className="mt-2 text-sm text-ink-soft">None logged yet.</p>
            ) : (
              <table className="num mt-2 w-full min-w-[30rem] text-left text-sm" data-testid="tests-table">
                <thead className="text-ink-soft">
                  <tr>
                    <th className="py-1 font-medium">Date</th>
                    <th className="py-1 font-medium">Test</th>
                    <th className="py-1 font-medium">Threshold</th>
                    <th className="py-1 font-medium">Status</th>
                    <th className="py-1 font-medium" />
                  </tr>
                </thead>
                <tbody>
                  {tests.map((t) => (
                    <tr
                      key={t.id}
                      className={`border-t border-line/60 ${t.status === "undone" ? "text-ink-soft" : ""}`}
                      data-status={t.status}
                    >
                      <td className="py-2">{t.testedOn}</td>
                      <td className="py-2">{t.label}</td>
                      <td className={`py-2 ${t.status === "undone" ? "line-through" : ""}`}>
                        {LABEL[`${t.sport}:${t.metric}`]} {t.display}
                      </td>
                      <td className="py-2 text-xs">
                        {t.status === "undone" ? (
                          <span className="font-medium text-brick">
                            Undone {t.undoneAt?.slice(0, 10)}
                            {t.undoneBy ? ` by ${t.undoneBy}` : ""}
                          </span>
                        ) : t.inForce ? (
                          <span className="font-medium text-teal-dark">In force</span>
                        ) : (
                          <span>Replaced by a later threshold</span>
                        )}
                      </td>
                      <td className="py-2 text-right">
                        {t.canUndo && (
                          <undo.Form
                            method="post"
                            onSubmit={(e) =>
                              !confirm("Remove this test and put the previous targets back?") && e.preventDefault()
                            }
                          >
                            <input type="hidden" name="testId" value={t.id} />
                            <button
                              className={buttonClass("ghost", "px-2 py-1 text-brick")}
                              disabled={undo.state !== "idle"}
                            >
                              Undo
                            </button>
                          </undo.Form>
                        )}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </Card>
        </div>
        <div className="flex flex-col gap-4">
          <Card>
            <h2 className="font-semibold">Current thresholds</h2>
            <ul className="num mt-2 flex flex-col gap-1 text-sm">
              {current.map((t) => (
                <li key={t.id} className="flex justify-between">
                  <span>{LABEL[`${t.sport}:${t.metric}`]}</span>
                  <span className="font-medium">{show(t.value, t.unit)}</span>
                </li>
              ))}
              {current.length === 0 && <li className="text-ink-soft">None yet.</li>}
            </ul>
          </Card>
          {loaderData.runningPaces && <RunningPacesCard paces={loaderData.runningPaces} />}
          {zones.map((z) => (
            <BandTable key={z.key} table={z} />
          ))}
        </div>
      </div>
    </>
  );
}
