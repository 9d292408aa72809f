import { planFor } from "~/.server/access";
import { requireRole } from "~/.server/auth";
import { applyBoardOp, boardItemDetail, boardOpSchema } from "~/.server/services/board";
import { loadPlan } from "~/.server/services/plans";
import { jsonResponse as json, requireJson } from "~/.server/http";
import { jsonFailure } from "~/.server/replies";

import type { Route } from "./+types/plan-items";

const NOT_YOURS = { error: "No plan with this id is yours." };

/** The plan's items in full; with `?item=<id>` that one item (the board's drawer asks when a card opens). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  if (!(await planFor(coach, Number(params.planId)))) return json(NOT_YOURS, 404);
  try {
    const itemId = new URL(request.url).searchParams.get("item");
    if (itemId !== null) return json({ item: await boardItemDetail(coach.id, Number(params.planId), Number(itemId)) });
    const { plan, items } = await loadPlan(coach.id, Number(params.planId));
    return json({ version: plan.version, items });
  } catch (err) {
    return jsonFailure(err);
  }
}

/** Board changes as JSON: { op: "copy" | "move" | "remove" | "duplicate-week" | "move-week" | "time", version, … }. */
export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  requireJson(request);
  if (!(await planFor(coach, Number(params.planId)))) return json(NOT_YOURS, 404);
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    return json({ error: "Send the change as JSON." }, 400);
  }
  const parsed = boardOpSchema.safeParse(body);
  if (!parsed.success)
    return json(
      {
        error: "That change is not one the board understands.",
        issues: parsed.error.issues.slice(0, 5).map((i) => `${i.path.join(".")}: ${i.message}`),
      },
      400,
    );
  try {
    return json(await applyBoardOp(coach.id, Number(params.planId), parsed.data));
  } catch (err) {
    return jsonFailure(err);
  }
}
