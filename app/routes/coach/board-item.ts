import { data } from "react-router";
import { requireRole } from "~/.server/auth";
import { requirePlan } from "~/.server/access";
import { domainFailure, statusFor } from "~/.server/replies";
import { boardItemDetail } from "~/.server/services/board";
import type { Route } from "./+types/board-item";

/**
 * One card's blocks, read when the board opens it. A card another tab removed is an answer the drawer shows, not a
 * thrown error: a fetcher's thrown error would replace the whole board with the error page.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  const plan = await requirePlan(coach, params.planId);
  try {
    return { item: await boardItemDetail(coach.id, plan.id, Number(params.itemId)), error: null };
  } catch (err) {
    const e = domainFailure(err);
    return data({ item: null, error: e.message }, { status: statusFor(e.kind) });
  }
}
