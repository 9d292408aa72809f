import { Link } from "react-router";
import { SessionDetail } from "~/components/calendar/session-detail";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { calendarSubject } from "~/.server/services/calendar";
import { sessionPageData } from "~/.server/services/session-page";
import { SessionComments } from "~/components/calendar/session-comments";
import { commentAction, listComments } from "~/.server/services/comments";
import type { Route } from "./+types/athlete-session";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.session.name ?? "Session"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  const athlete = await calendarSubject(coach, params.athleteId);
  const page = await sessionPageData(athlete, Number(params.sessionId));
  return { athleteId: athlete.id, athleteName: athlete.name, ...page, comments: await listComments(coach, page.session.id), timezone: coach.timezone };
}

export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const athlete = await calendarSubject(coach, params.athleteId);
  const page = await sessionPageData(athlete, Number(params.sessionId));
  return commentAction(coach, page.session.id, await request.formData());
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
      <SessionDetail data={loaderData} canComplete={false} subjectName={loaderData.athleteName} />
      <SessionComments comments={loaderData.comments} otherSide={loaderData.athleteName} timezone={loaderData.timezone} />
    </>
  );
}
