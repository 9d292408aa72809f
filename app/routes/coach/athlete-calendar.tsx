import { Link } from "react-router";
import { CalendarViews, MonthCalendar } from "~/components/calendar/month-calendar";
import { WeekCalendar } from "~/components/calendar/week-calendar";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { requireAthleteFor } from "~/.server/access";
import { calendarRange } from "~/.server/services/calendar";
import { addDays, isIsoDate, mondayOf, todayIn } from "~/lib/dates";
import { monthGrid, monthOf } from "~/lib/month";
import type { Route } from "./+types/athlete-calendar";

export const meta: Route.MetaFunction = ({ data }) => [
  { title: `${data?.athlete.name ?? "Athlete"}'s calendar · Pacewright` },
];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  const athlete = await requireAthleteFor(coach, params.athleteId);
  const today = todayIn(athlete.timezone);
  const who = { id: athlete.id, name: athlete.name };
  const url = new URL(request.url);
  if (url.searchParams.get("view") === "month") {
    const month = monthOf(url.searchParams.get("month"), today);
    const grid = monthGrid(month);
    return {
      view: "month" as const,
      athlete: who,
      today,
      month,
      ...grid,
      sessions: await calendarRange(athlete.id, grid.from, grid.to),
    };
  }
  // The two weeks shown start on the Monday of ?from= (any day of that week), else this week.
  const asked = url.searchParams.get("from");
  const from = mondayOf(isIsoDate(asked) ? asked : today);
  return {
    view: "weeks" as const,
    athlete: who,
    today,
    from,
    sessions: await calendarRange(athlete.id, from, addDays(from, 13)),
  };
}

export default function CoachAthleteCalendar({ loaderData }: Route.ComponentProps) {
  const { athlete } = loaderData;
  return (
    <>
      <p className="mb-2 text-sm">
        <Link to={`/coach/athletes/${athlete.id}`} className="text-teal underline">
          {athlete.name}
        </Link>{" "}
        / Calendar
      </p>
      <PageHeader title={`${athlete.name}'s calendar`} />
      <CalendarViews view={loaderData.view} />
      {loaderData.view === "month" ? (
        <MonthCalendar
          {...loaderData}
          title={`${athlete.name}'s calendar`}
          sessionHref={(id) => `/coach/athletes/${athlete.id}/sessions/${id}`}
        />
      ) : (
        <WeekCalendar
          key={loaderData.from}
          athleteId={athlete.id}
          from={loaderData.from}
          today={loaderData.today}
          sessions={loaderData.sessions}
          sessionHref={(id) => `/coach/athletes/${athlete.id}/sessions/${id}`}
        />
      )}
    </>
  );
}
