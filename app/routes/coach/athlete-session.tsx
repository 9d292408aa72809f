import { Link } from "react-router";
import { SessionDetail } from "~/components/calendar/session-detail";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { requireAthleteFor, requireScheduledSession } from "~/.server/access";
import { loaderFailure, pageFailure } from "~/.server/replies";
import { sessionPageData } from "~/.server/services/session-page";
import { SessionComments } from "~/components/calendar/session-comments";
import { listComments } from "~/.server/services/comments";
import { lapFromSearch, savePacingSplit } from "~/.server/services/pacing";
import { commentAction } from "../athlete/session.server";
import { PacingCard, pacingQuery } from "~/components/pacing-plan";
import type { Route } from "./+types/athlete-session";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.session.name ?? "Session"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  const athlete = await requireAthleteFor(coach, params.athleteId);
  const { id } = await requireScheduledSession(coach, params.sessionId, athlete);
  const page = await sessionPageData(athlete, id, { lap: lapFromSearch(new URL(request.url)) }).catch(loaderFailure);
  return {
    athleteId: athlete.id,
    athleteName: athlete.name,
    ...page,
    comments: await listComments(coach, page.session.id),
    timezone: coach.timezone,
  };
}

/** The coach writes in the session's thread, or sets this test's pacing split. */
export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const athlete = await requireAthleteFor(coach, params.athleteId);
  const { id } = await requireScheduledSession(coach, params.sessionId, athlete);
  const form = await request.formData();
  if (form.get("intent") !== "pacing-split") return commentAction(coach, id, form);
  try {
    const reset = form.get("reset") === "1";
    const r = await savePacingSplit(athlete.id, id, { split: form.getAll("split").map(String), reset });
    return { ok: true, message: r.custom ? `Split saved: ${r.split.join(" / ")} %.` : "Back to the usual split." };
  } catch (err) {
    return pageFailure(err, (e) => ({ ok: false, message: e.message }));
  }
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
      {loaderData.pacing && (
        <div className="mb-6">
          <PacingCard
            data={loaderData.pacing}
            printHref={`/coach/athletes/${loaderData.athleteId}/sessions/${loaderData.session.id}/pacing${pacingQuery(loaderData.pacing.lap)}`}
            canEditSplit={loaderData.session.status === "planned"}
          />
        </div>
      )}
      <SessionDetail data={loaderData} canComplete={false} subjectName={loaderData.athleteName} />
      <SessionComments
        comments={loaderData.comments}
        otherSide={loaderData.athleteName}
        timezone={loaderData.timezone}
      />
    </>
  );
}
