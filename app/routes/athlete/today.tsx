import { useSearchParams } from "react-router";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { CoachAthlete, User } from "~/.server/models";
import type { Route } from "./+types/today";

export const meta: Route.MetaFunction = () => [{ title: "Today · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const athlete = await requireRole(request, "athlete");
  const links = await CoachAthlete.findAll({ where: { athleteId: athlete.id } });
  const coaches = links.length ? await User.findAll({ where: { id: links.map((l) => l.coachId) } }) : [];
  const today = new Intl.DateTimeFormat("en-GB", {
    weekday: "long",
    day: "numeric",
    month: "long",
    timeZone: athlete.timezone,
  }).format(new Date());
  return { name: athlete.name, today, coaches: coaches.map((c) => ({ id: c.id, name: c.name })) };
}

export default function Today({ loaderData }: Route.ComponentProps) {
  const [params] = useSearchParams();
  const { name, today, coaches } = loaderData;
  return (
    <>
      <PageHeader title={`Hello, ${name.split(" ")[0]}`} lead={today} />
      {params.get("joined") && (
        <div className="mb-6">
          <FormMessage tone="ok">You joined your coach's roster. Your plan will show up here.</FormMessage>
        </div>
      )}
      <div className="grid gap-6 md:grid-cols-2">
        <Card>
          <h2 className="font-semibold">Today's session</h2>
          <p className="mt-2 text-sm text-ink-soft">Nothing is planned for today.</p>
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
