import { LoadCharts } from "~/components/load-charts";
import { PageHeader } from "~/components/ui/card";
import { loadSeries } from "~/.server/services/load";
import { powerCurveComparison } from "~/.server/services/load-figures";
import { requireAthleteSubject } from "~/.server/access";
import { addDays, todayIn } from "~/lib/dates";
import { loadRange } from "~/lib/load-ranges";
import type { Route } from "./+types/load";

export const meta: Route.MetaFunction = () => [{ title: "Training load · Pacewright" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { athlete, viewer } = await requireAthleteSubject(request, params.athleteId);
  const today = todayIn(athlete.timezone);
  // The period lives in the URL (?range=…), so it can be shared, bookmarked and kept on reload; unknown values fall back.
  const range = loadRange(new URL(request.url).searchParams.get("range"));
  const series = await loadSeries(athlete, addDays(today, -range.days + 1), addDays(today, 28));
  return {
    athlete: { id: athlete.id, name: athlete.name },
    forCoach: viewer.id !== athlete.id,
    range: range.key,
    data: { ...series, powerCurve: await powerCurveComparison(athlete) },
  };
}

export default function LoadPage({ loaderData }: Route.ComponentProps) {
  const { athlete, forCoach, data, range } = loaderData;
  return (
    <>
      <PageHeader
        title={forCoach ? `${athlete.name}: training load` : "Training load"}
        lead="What was planned against what was done, and where the load is heading."
      />
      <LoadCharts athleteId={athlete.id} data={data} range={range} />
    </>
  );
}
