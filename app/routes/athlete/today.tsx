import { Link } from "react-router";
import { Card, PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { CoachAthlete, User } from "~/.server/models";
import { calendarRange } from "~/.server/services/calendar";
import { addDays, todayIn } from "~/lib/dates";
import { formatMinutes } from "~/lib/duration";
import { formatLongDay } from "~/lib/format";
import type { Route } from "./+types/today";

export const meta: Route.MetaFunction = () => [{ title: "Today · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const athlete = await requireRole(request, "athlete");
  const links = await CoachAthlete.findAll({ where: { athleteId: athlete.id } });
  const coaches = links.length ? await User.findAll({ where: { id: links.map((l) => l.coachId) } }) : [];
  const today = formatLongDay(new Date(), athlete.timezone);
  const date = todayIn(athlete.timezone);
  const upcoming = await calendarRange(athlete.id, date, addDays(date, 6));
  return {
    name: athlete.name,
    today,
    coaches: coaches.map((c) => ({ id: c.id, name: c.name })),
    todays: upcoming.filter((s) => s.date === date),
    next: upcoming.filter((s) => s.date > date && s.status === "planned").slice(0, 3),
  };
}

export default function Today({ loaderData }: Route.ComponentProps) {
  const { name, today, coaches, todays, next } = loaderData;
  return (
    <>
      <PageHeader title={`Hello, ${name.split(" ")[0]}`} lead={today} />
      <div className="grid gap-6 md:grid-cols-2">
        <Card>
          <h2 className="font-semibold">Today</h2>
          {todays.length === 0 ? (
            <p className="mt-2 text-sm text-ink-soft">Nothing is planned for today. Rest well.</p>
          ) : (
            <ul className="mt-2 flex flex-col gap-3">
              {todays.map((s) => (
                <li key={s.id}>
                  <Link to={`/athlete/sessions/${s.id}`} className="font-medium text-teal hover:underline">
                    {s.name}
                  </Link>
                  <span className="num ml-2 text-sm text-ink-soft">
                    {formatMinutes(s.plannedDurationS)} · {s.status}
                  </span>
                  <p className="num text-sm font-medium">{s.keyTarget}</p>
                  {s.needsTest && <p className="text-sm text-brick">Targets show in % until you log a field test.</p>}
                </li>
              ))}
            </ul>
          )}
          {next.length > 0 && (
            <>
              <h3 className="mt-4 text-sm font-medium text-ink-soft">Coming up</h3>
              <ul className="mt-1 flex flex-col gap-1 text-sm">
                {next.map((s) => (
                  <li key={s.id}>
                    <Link to={`/athlete/sessions/${s.id}`} className="hover:underline">
                      <span className="num text-ink-soft">{s.date.slice(5)}</span> {s.name}
                    </Link>
                  </li>
                ))}
              </ul>
            </>
          )}
          <Link to="/athlete/calendar" className="mt-4 inline-block text-sm text-teal underline">
            Open the calendar
          </Link>
        </Card>
        <Card>
          <h2 className="font-semibold">Your coach</h2>
          {coaches.length ? (
            <ul className="mt-2 text-sm">
              {coaches.map((c) => (
                <li key={c.id}>{c.name}</li>
              ))}
            </ul>
          ) : (
            <p className="mt-2 text-sm text-ink-soft">You train on your own for now.</p>
          )}
        </Card>
      </div>
    </>
  );
}
