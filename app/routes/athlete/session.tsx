import { Link } from "react-router";
import { SessionDetail } from "~/components/calendar/session-detail";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { requireScheduledSession } from "~/.server/access";
import { loaderFailure, pageFailure } from "~/.server/replies";
import { sessionPageData } from "~/.server/services/session-page";
import { attachRide } from "~/.server/services/ride-attach";
import { AttachRide } from "~/components/calendar/attach-ride";
import { SessionComments } from "~/components/calendar/session-comments";
import { listComments } from "~/.server/services/comments";
import { commentAction, completeFromForm } from "./session.server";
import { CoachAthlete, User } from "~/.server/models";
import { lapFromSearch } from "~/.server/services/pacing";
import { PacingCard, pacingQuery } from "~/components/pacing-plan";
import type { Route } from "./+types/session";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.session.name ?? "Session"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const athlete = await requireRole(request, "athlete");
  const { id } = await requireScheduledSession(athlete, params.id);
  const page = await sessionPageData(athlete, id, { lap: lapFromSearch(new URL(request.url)) }).catch(loaderFailure);
  const coaches = await User.findAll({
    where: { id: (await CoachAthlete.findAll({ where: { athleteId: athlete.id } })).map((l) => l.coachId) },
    attributes: ["name"],
  });
  return {
    ...page,
    comments: await listComments(athlete, page.session.id),
    coachNames: coaches.map((c) => c.name),
    timezone: athlete.timezone,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const athlete = await requireRole(request, "athlete");
  const { id } = await requireScheduledSession(athlete, params.id);
  const form = await request.formData();
  if (form.get("intent") === "comment") return commentAction(athlete, id, form);
  if (form.get("intent") === "attach") {
    const page = await sessionPageData(athlete, id).catch(loaderFailure);
    const score = form.get("effortScore");
    try {
      const r = await attachRide(
        athlete,
        Number(form.get("uploadId")),
        page.session.date,
        score === null || score === "" ? null : Math.max(0, Math.min(10, Math.round(Number(score)))),
      );
      return {
        ok: true,
        message: r.matched
          ? "Ride file attached; the session is marked done."
          : "This day had no planned ride left; the file was kept as an unplanned ride.",
      };
    } catch (err) {
      return pageFailure(err, (e) => ({ ok: false, message: e.message }));
    }
  }
  return completeFromForm(athlete, id, form);
}

export default function AthleteSession({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <p className="mb-2 text-sm">
        <Link to="/athlete/calendar" className="text-teal underline">
          Calendar
        </Link>{" "}
        / {loaderData.session.name}
      </p>
      <PageHeader title={loaderData.session.name} />
      {loaderData.pacing && (
        <div className="mb-6">
          <PacingCard
            data={loaderData.pacing}
            printHref={`/athlete/sessions/${loaderData.session.id}/pacing${pacingQuery(loaderData.pacing.lap)}`}
            canEditSplit={false}
          />
        </div>
      )}
      <SessionDetail data={loaderData} canComplete />
      {loaderData.session.status === "planned" && loaderData.session.sport === "bike" && <AttachRide />}
      {loaderData.coachNames.length > 0 && (
        <SessionComments
          comments={loaderData.comments}
          otherSide={loaderData.coachNames.join(" and ")}
          timezone={loaderData.timezone}
        />
      )}
    </>
  );
}
