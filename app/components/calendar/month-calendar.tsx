import { Link } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { addDays, daysBetween, formatDay } from "~/lib/dates";
import { formatMinutes } from "~/lib/duration";
import { shiftMonth } from "~/lib/month";
import type { CalendarEntry } from "~/lib/calendar-entry";

const STATUS_WORD: Record<string, string> = { done: "done", skipped: "skipped" };

/**
 * A month at a glance, read-only, that also prints: on paper every session lists its blocks with the athlete's
 * own targets, and the app's navigation and buttons are left out.
 */
export function MonthCalendar({
  month,
  from,
  to,
  first,
  last,
  today,
  sessions,
  sessionHref,
  title,
}: {
  month: string;
  from: string;
  to: string;
  first: string;
  last: string;
  today: string;
  sessions: CalendarEntry[];
  sessionHref: (id: number) => string;
  title: string;
}) {
  const days = Array.from({ length: daysBetween(from, to) + 1 }, (_, i) => addDays(from, i));
  const monthName = formatDay(first, { month: "long", year: "numeric" });
  const total = sessions.reduce((s, x) => s + x.plannedDurationS, 0);
  return (
    <section aria-label={`${title}, ${monthName}`} className="print:text-[10pt]">
      <div className="mb-3 flex flex-wrap items-center gap-2">
        <h2 className="num text-lg font-semibold">{monthName}</h2>
        <span className="text-sm text-ink-soft">
          {sessions.length} session{sessions.length === 1 ? "" : "s"}, {formatMinutes(total)} planned
        </span>
        <span className="ml-auto flex gap-2 print:hidden">
          <Link
            to={`?view=month&month=${shiftMonth(month, -1)}`}
            className={buttonClass("secondary", "px-3 py-1")}
            aria-label="Previous month"
          >
            ← Earlier
          </Link>
          <Link
            to={`?view=month&month=${shiftMonth(month, 1)}`}
            className={buttonClass("secondary", "px-3 py-1")}
            aria-label="Next month"
          >
            Later →
          </Link>
          <button type="button" className={buttonClass("secondary", "px-3 py-1")} onClick={() => window.print()}>
            Print
          </button>
        </span>
      </div>
      <ol className="grid grid-cols-1 gap-1 sm:grid-cols-7 print:grid-cols-7">
        {["Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"].map((d) => (
          <li key={d} aria-hidden="true" className="hidden text-xs font-medium text-ink-soft sm:block print:block">
            {d}
          </li>
        ))}
        {days.map((d) => {
          const inMonth = d >= first && d <= last;
          const mine = sessions.filter((s) => s.date === d);
          // On a phone the list keeps only the month's days that hold something, and today.
          const phoneHidden = !inMonth || (mine.length === 0 && d !== today);
          return (
            <li
              key={d}
              data-testid={`month-day-${d}`}
              className={`min-h-16 rounded-lg border p-1.5 text-xs break-inside-avoid ${inMonth ? "bg-white" : "bg-paper text-ink-soft"} ${d === today ? "border-brick" : "border-line"} ${phoneHidden ? "hidden sm:block print:block" : ""}`}
            >
              <p className="num font-medium">
                <span className="sm:hidden print:hidden">{formatDay(d)}</span>
                <span className="hidden sm:inline print:inline">{Number(d.slice(8))}</span>
              </p>
              <ul className="mt-1 flex flex-col gap-1">
                {mine.map((s) => (
                  <li
                    key={s.id}
                    className={`rounded border px-1 py-0.5 ${s.testProtocol ? "border-brick/50" : "border-line"} ${s.status === "skipped" ? "line-through" : ""}`}
                  >
                    <Link to={sessionHref(s.id)} className="font-medium leading-tight hover:underline">
                      {s.timeOfDay && <span className="num mr-1 text-ink-soft">{s.timeOfDay}</span>}
                      {s.name}
                    </Link>
                    <span className="num block text-ink-soft">
                      {formatMinutes(s.plannedDurationS)}
                      {STATUS_WORD[s.status] ? ` · ${STATUS_WORD[s.status]}` : ""}
                    </span>
                    <span className="num hidden print:block">{s.lines.join("; ")}</span>
                  </li>
                ))}
              </ul>
            </li>
          );
        })}
      </ol>
    </section>
  );
}

/** Two weeks to plan and move sessions; a month to look ahead and to print. */
export function CalendarViews({ view }: { view: "weeks" | "month" }) {
  const tab = (active: boolean) =>
    `rounded-md px-3 py-1 text-sm font-medium ${active ? "bg-teal text-paper" : "text-ink hover:bg-paper-deep"}`;
  return (
    <nav aria-label="Calendar view" className="mb-3 flex gap-1 print:hidden">
      <Link to="?" className={tab(view === "weeks")} aria-current={view === "weeks" ? "page" : undefined}>
        Two weeks
      </Link>
      <Link to="?view=month" className={tab(view === "month")} aria-current={view === "month" ? "page" : undefined}>
        Month
      </Link>
    </nav>
  );
}
