import { Link } from "react-router";
import { SessionDetail } from "~/components/calendar/session-detail";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { completeFromForm, sessionPageData } from "~/.server/services/session-page";
import type { Route } from "./+types/session";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.session.name ?? "Session"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const athlete = await requireRole(request, "athlete");
  return sessionPageData(athlete, Number(params.id));
}

export async function action({ request, params }: Route.ActionArgs) {
  const athlete = await requireRole(request, "athlete");
  return completeFromForm(athlete, Number(params.id), await request.formData());
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
      <SessionDetail data={loaderData} canComplete />
    </>
  );
}
