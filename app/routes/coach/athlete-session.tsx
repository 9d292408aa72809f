import { Link } from "react-router";
import { SessionDetail } from "~/components/calendar/session-detail";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { calendarSubject } from "~/.server/services/calendar";
import { sessionPageData } from "~/.server/services/session-page";
import type { Route } from "./+types/athlete-session";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.session.name ?? "Session"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  const athlete = await calendarSubject(coach, params.athleteId);
  return { athleteId: athlete.id, athleteName: athlete.name, ...(await sessionPageData(athlete, Number(params.sessionId))) };
}

export default function CoachAthleteSession({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <p className="mb-2 text-sm">
        <Link to={`/coach/athletes/${loaderData.athleteId}/calendar`} className="text-teal underline">
          {loaderData.athleteName}'s calendar
        </Link>{" "}
        / {loaderData.session.name}
      </p>
      <PageHeader title={loaderData.session.name} />
      <SessionDetail data={loaderData} canComplete={false} />
    </>
  );
}
