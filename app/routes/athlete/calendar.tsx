import { CalendarViews, MonthCalendar } from "~/components/calendar/month-calendar";
import { WeekCalendar } from "~/components/calendar/week-calendar";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { calendarRange } from "~/.server/services/calendar";
import { addDays, isIsoDate, mondayOf, todayIn } from "~/lib/dates";
import { monthGrid, monthOf } from "~/lib/month";
import type { Route } from "./+types/calendar";

export const meta: Route.MetaFunction = () => [{ title: "Calendar · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const athlete = await requireRole(request, "athlete");
  const today = todayIn(athlete.timezone);
  const url = new URL(request.url);
  if (url.searchParams.get("view") === "month") {
    const month = monthOf(url.searchParams.get("month"), today);
    const grid = monthGrid(month);
    return {
      view: "month" as const,
      today,
      month,
      ...grid,
      sessions: await calendarRange(athlete.id, grid.from, grid.to),
    };
  }
  // The two weeks shown start on the Monday of ?from= (any day of that week), else this week.
  const asked = url.searchParams.get("from");
  const from = mondayOf(isIsoDate(asked) ? asked : today);
  return { view: "weeks" as const, today, from, sessions: await calendarRange(athlete.id, from, addDays(from, 13)) };
}

export default function AthleteCalendar({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageHeader
        title="Calendar"
        lead="Your sessions with targets from your own thresholds. Drag a session to move it to another day."
      />
      <CalendarViews view={loaderData.view} />
      {loaderData.view === "month" ? (
        <MonthCalendar {...loaderData} title="Your calendar" sessionHref={(id) => `/athlete/sessions/${id}`} />
      ) : (
        <WeekCalendar
          key={loaderData.from}
          from={loaderData.from}
          today={loaderData.today}
          sessions={loaderData.sessions}
          sessionHref={(id) => `/athlete/sessions/${id}`}
        />
      )}
    </>
  );
}
