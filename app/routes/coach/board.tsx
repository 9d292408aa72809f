import { Link } from "react-router";
import { PlanBoard } from "~/components/board/plan-board";
import { requireRole } from "~/.server/auth";
import { requirePlan } from "~/.server/access";
import { loadBoard } from "~/.server/services/board";
import { listShelfSessions } from "~/.server/services/shelf";
import { loaderFailure } from "~/.server/replies";
import type { Route } from "./+types/board";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Board · ${data?.plan.name ?? "Plan"} · Pacewright` }];
export const handle = { wide: true };

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  await requirePlan(coach, params.planId);
  try {
    const [board, shelf] = await Promise.all([loadBoard(coach, Number(params.planId)), listShelfSessions(coach.id)]);
    return {
      ...board,
      shelf: shelf.map(({ id, name, sport, durationS, profile, tags }) => ({
        id,
        name,
        sport,
        durationS,
        profile,
        tags,
      })),
    };
  } catch (err) {
    loaderFailure(err);
  }
}

export default function Board({ loaderData }: Route.ComponentProps) {
  const { plan, assigned, outdated } = loaderData;
  return (
    <>
      <div className="mb-3 flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-sm">
            <Link to="/coach/plans" className="text-teal underline">
              Season plans
            </Link>{" "}
            /{" "}
            <Link to={`/coach/plans/${plan.id}`} className="text-teal underline">
              {plan.name}
            </Link>{" "}
            / Board
          </p>
          <h1 className="text-2xl font-semibold">{plan.name}</h1>
        </div>
        <div className="flex flex-wrap items-center gap-2 text-sm">
          {outdated > 0 && (
            <span className="rounded-lg bg-brick/10 px-3 py-2 text-brick" role="status">
              {assigned === 1
                ? "The athlete on this plan follows"
                : outdated === assigned
                  ? `All ${assigned} athletes on this plan follow`
                  : `${outdated} of the ${assigned} athletes on this plan follow`}{" "}
              an older version of it.{" "}
              <Link to={`/coach/plans/${plan.id}/assign`} className="underline">
                Push changes
              </Link>
            </span>
          )}
          <Link
            to={`/coach/plans/${plan.id}/assign`}
            className="rounded-lg bg-teal px-4 py-2 font-medium text-paper hover:bg-teal-dark"
          >
            Assign to athletes
          </Link>
        </div>
      </div>
      <PlanBoard key={plan.id} data={loaderData} shelf={loaderData.shelf} />
    </>
  );
}
