import { LoadCharts } from "~/components/load-charts";
import { PageHeader } from "~/components/ui/card";
import { loadSeries, powerCurveComparison } from "~/.server/services/load";
import { requireAthleteSubject } from "~/.server/access";
import { addDays, todayIn } from "~/lib/dates";
import type { Route } from "./+types/load";

export const meta: Route.MetaFunction = () => [{ title: "Training load · Pacewright" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { athlete, viewer } = await requireAthleteSubject(request, params.athleteId);
  const today = todayIn(athlete.timezone);
  const series = await loadSeries(athlete, addDays(today, -89), addDays(today, 28));
  return { athlete: { id: athlete.id, name: athlete.name }, forCoach: viewer.id !== athlete.id, initial: { ...series, powerCurve: await powerCurveComparison(athlete) } };
}

export default function LoadPage({ loaderData }: Route.ComponentProps) {
  const { athlete, forCoach, initial } = loaderData;
  return (
    <>
      <PageHeader title={forCoach ? `${athlete.name}: training load` : "Training load"} lead="What was planned against what was done, and where the load is heading." />
      <LoadCharts athleteId={athlete.id} initial={initial} />
    </>
  );
}
