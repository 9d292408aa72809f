import { WeekCalendar } from "~/components/calendar/week-calendar";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { calendarRange } from "~/.server/services/calendar";
import { addDays, mondayOf, todayIn } from "~/lib/dates";
import type { Route } from "./+types/calendar";

export const meta: Route.MetaFunction = () => [{ title: "Calendar · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const athlete = await requireRole(request, "athlete");
  const today = todayIn(athlete.timezone);
  const from = mondayOf(today);
  return { today, from, sessions: await calendarRange(athlete.id, from, addDays(from, 13)) };
}

export default function AthleteCalendar({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageHeader title="Calendar" lead="Your sessions with targets from your own thresholds. Drag a session to move it to another day." />
      <WeekCalendar from={loaderData.from} today={loaderData.today} sessions={loaderData.sessions} sessionHref={(id) => `/athlete/sessions/${id}`} />
    </>
  );
}
