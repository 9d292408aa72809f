import { PacingSheet } from "~/components/pacing-plan";
import { requireUser } from "~/.server/auth";
import { requireAthleteFor } from "~/.server/access";
import { loaderFailure } from "~/.server/replies";
import { lapFromSearch } from "~/.server/services/pacing";
import { sessionPageData } from "~/.server/services/session-page";
import { notFound } from "~/.server/http";
import type { Route } from "./+types/pacing-print";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Pacing plan · ${data?.name ?? "Test"} · Pacewright` }];

/** One page to take to the test: the plan alone, without the app around it. The athlete's own, or their coach's view. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  let athlete = user;
  if (params.athleteId !== undefined) {
    if (user.role !== "coach") notFound("No such page.");
    athlete = await requireAthleteFor(user, params.athleteId);
  } else if (user.role !== "athlete") notFound("No such page.");
  const page = await sessionPageData(athlete, Number(params.id ?? params.sessionId), {
    lap: lapFromSearch(new URL(request.url)),
  }).catch(loaderFailure);
  if (!page.pacing?.plan) notFound("This session has no pacing plan.");
  return { name: page.session.name, date: page.session.date, athleteName: athlete.name, pacing: page.pacing };
}

export default function PacingPrint({ loaderData }: Route.ComponentProps) {
  return (
    // Print rules live in app.css: the content security policy admits no inline <style> element.
    <main className="pacing-print mx-auto max-w-3xl bg-white p-6 text-ink print:max-w-none print:p-0">
      <div className="mb-4 flex gap-2 print:hidden">
        <button
          type="button"
          onClick={() => window.print()}
          className="rounded-lg bg-teal px-4 py-2 text-sm font-medium text-white"
        >
          Print
        </button>
        <button
          type="button"
          onClick={() => history.back()}
          className="rounded-lg border border-line px-4 py-2 text-sm"
        >
          Back
        </button>
      </div>
      <p className="num text-sm text-ink-soft">
        {loaderData.athleteName} · {loaderData.date}
      </p>
      <PacingSheet data={loaderData.pacing} sessionName={loaderData.name} />
    </main>
  );
}
