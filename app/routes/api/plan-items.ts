import { requireRole } from "~/.server/auth";
import { applyBoardOp, boardItemDetail, boardOpSchema, StaleBoardError } from "~/.server/services/board";
import { loadPlan, PlanError } from "~/.server/services/plans";
import { jsonResponse as json, requireJson } from "~/.server/http";
import type { Route } from "./+types/plan-items";

/** The plan's items in full; with `?item=<id>` that one item (the board's drawer asks when a card opens). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  try {
    const itemId = new URL(request.url).searchParams.get("item");
    if (itemId !== null) return json({ item: await boardItemDetail(coach.id, Number(params.planId), Number(itemId)) });
    const { plan, items } = await loadPlan(coach.id, Number(params.planId));
    return json({ version: plan.version, items });
  } catch (err) {
    if (err instanceof PlanError) return json({ error: err.message }, err.status);
    throw err;
  }
}

/** Board changes as JSON: { op: "copy" | "move" | "remove" | "duplicate-week" | "move-week" | "time", version, … }. */
export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  requireJson(request);
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    return json({ error: "Send the change as JSON." }, 400);
  }
  const parsed = boardOpSchema.safeParse(body);
  if (!parsed.success) return json({ error: "That change is not one the board understands.", issues: parsed.error.issues.slice(0, 5).map((i) => `${i.path.join(".")}: ${i.message}`) }, 400);
  try {
    return json(await applyBoardOp(coach.id, Number(params.planId), parsed.data));
  } catch (err) {
    if (err instanceof StaleBoardError) return json({ error: err.message, version: err.currentVersion }, 409);
    if (err instanceof PlanError) return json({ error: err.message }, err.status);
    throw err;
  }
}
