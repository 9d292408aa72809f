import { Link } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { requireRole } from "~/.server/auth";
import { requirePlan } from "~/.server/access";
import { loaderFailure } from "~/.server/replies";
import { loadPlan } from "~/.server/services/plans";
import { addDays, formatDay } from "~/lib/dates";
import { formatMinutes } from "~/lib/duration";
import { DAY_LONG, PHASE_LABEL } from "~/lib/plans";
import { describeBlock } from "~/lib/sessions";
import type { Route } from "./+types/plan-print";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.plan.name ?? "Plan"} (print) · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  await requirePlan(coach, params.planId);
  try {
    return await loadPlan(coach.id, Number(params.planId));
  } catch (err) {
    loaderFailure(err);
  }
}

const safe = (f: () => string) => {
  try {
    return f();
  } catch {
    return "";
  }
};

/** The whole plan on paper: one block per week with its phase, hours and every session's blocks in % of threshold. */
export default function PlanPrint({ loaderData }: Route.ComponentProps) {
  const { plan, weeks, items } = loaderData;
  return (
    <article className="mx-auto max-w-4xl print:max-w-none print:text-[10pt]">
      <div className="mb-4 flex flex-wrap items-center gap-2 print:hidden">
        <Link to={`/coach/plans/${plan.id}`} className="text-sm text-teal underline">
          Back to the plan
        </Link>
        <button type="button" className={buttonClass("primary", "ml-auto")} onClick={() => window.print()}>
          Print
        </button>
      </div>
      <h1 className="text-2xl font-semibold">{plan.name}</h1>
      <p className="text-sm text-ink-soft">
        {weeks.length} weeks · {plan.pattern} loading · targets in % of threshold
        {plan.startDate
          ? ` · from ${formatDay(plan.startDate, { day: "numeric", month: "long", year: "numeric" })}`
          : ""}
      </p>
      {plan.description && <p className="mt-2 text-sm">{plan.description}</p>}
      <ol className="mt-4 flex flex-col gap-4">
        {weeks.map((w) => {
          const mine = items.filter((i) => i.weekId === w.id).sort((a, b) => a.day - b.day || a.position - b.position);
          const monday = plan.startDate ? addDays(plan.startDate, (w.idx - 1) * 7) : null;
          return (
            <li
              key={w.id}
              className="break-inside-avoid rounded-lg border border-line bg-white p-3"
              data-testid={`print-week-${w.idx}`}
            >
              <h2 className="font-semibold">
                Week {w.idx}
                {monday && (
                  <span className="num font-normal text-ink-soft">
                    {" "}
                    · {formatDay(monday, { day: "numeric", month: "short" })} –{" "}
                    {formatDay(addDays(monday, 6), { day: "numeric", month: "short" })}
                  </span>
                )}
                <span className="font-normal"> · {PHASE_LABEL[w.phase as keyof typeof PHASE_LABEL] ?? w.phase}</span>
                {w.recovery && <span className="font-normal"> · recovery week</span>}
                {w.test && <span className="font-normal"> · test week</span>}
                <span className="num font-normal text-ink-soft"> · {w.plannedHours} h planned</span>
              </h2>
              {w.notes && <p className="text-sm">{w.notes}</p>}
              {mine.length === 0 ? (
                <p className="text-sm text-ink-soft">No sessions.</p>
              ) : (
                <table className="num mt-2 w-full text-left text-sm">
                  <tbody>
                    {mine.map((i) => (
                      <tr key={i.id} className="border-t border-line/60 align-top">
                        <td className="w-28 py-1 pr-2">{DAY_LONG[i.day]}</td>
                        <td className="py-1 pr-2">
                          <span className="font-medium">{i.name}</span> · {formatMinutes(i.durationS)}
                          {i.timeOfDay && ` · ${i.timeOfDay}`}
                          <span className="block text-ink-soft">
                            {i.blocks
                              .map((b) => safe(() => describeBlock(b)))
                              .filter(Boolean)
                              .join("; ")}
                          </span>
                          {i.notes && <span className="block">Note: {i.notes}</span>}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              )}
            </li>
          );
        })}
      </ol>
    </article>
  );
}
