import { Link } from "react-router";
import { z } from "zod";
import { errorsOf, parseSubmission, refuse } from "~/lib/forms";
import { SessionBuilder } from "~/components/session-builder";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { redirectWithToast } from "~/.server/flash";
import { notFound } from "~/.server/http";
import { createShelfSession, getShelfSession, updateShelfSession } from "~/.server/services/shelf";
import { newBlock, sessionSchema } from "~/lib/sessions";
import type { Block } from "~/lib/training";
import type { Route } from "./+types/session-edit";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.values.name || "New session"} · Pacewright` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  if (!params.sessionId) {
    const blocks: Block[] = [newBlock("warmup"), newBlock("repeats"), newBlock("cooldown")];
    return { id: null, usedIn: 0, values: { name: "", sport: "bike", description: "", tags: [] as string[], blocks } };
  }
  const found = await getShelfSession(coach.id, Number(params.sessionId));
  if (!found) notFound("No session with this id is on your shelf.");
  const { session, blocks, usedIn } = found;
  return {
    id: session.id,
    usedIn,
    values: { name: session.name, sport: session.sport, description: session.description, tags: session.tags, blocks },
  };
}

const payloadSchema = z.object({ payload: z.string() });
const UNREADABLE = "The session could not be read; reload the page and try again.";

export async function action({ request, params }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  // The builder sends the whole session as one JSON field (its steps nest too deep for flat names); the reply is
  // the usual one, with each message under the step field's path (`blocks.0.durationS`).
  const submission = parseSubmission(await request.formData(), payloadSchema);
  if (submission.status !== "success") return refuse(submission, { form: UNREADABLE });
  let raw: unknown;
  try {
    raw = JSON.parse(submission.value.payload);
  } catch {
    return refuse(submission, { form: UNREADABLE });
  }
  const parsed = sessionSchema.safeParse(raw);
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const issue of parsed.error.issues) fields[issue.path.join(".")] ??= issue.message;
    const { "": form, ...rest } = fields;
    return refuse(submission, { form, fields: rest });
  }
  if (!params.sessionId) {
    const session = await createShelfSession(coach.id, parsed.data);
    return redirectWithToast(request, `/coach/sessions/${session.id}`, "Saved to your shelf.");
  }
  const session = await updateShelfSession(coach.id, Number(params.sessionId), parsed.data);
  if (!session) notFound("No session with this id is on your shelf.");
  return redirectWithToast(request, `/coach/sessions/${session.id}`, "Saved to your shelf.");
}

export default function SessionEdit({ loaderData, actionData }: Route.ComponentProps) {
  const { id, values, usedIn } = loaderData;
  return (
    <>
      <p className="mb-2 text-sm">
        <Link to="/coach/sessions" className="text-teal underline">
          Session shelf
        </Link>{" "}
        / {id ? values.name : "New session"}
      </p>
      <PageHeader
        title={id ? values.name : "New session"}
        lead={
          usedIn
            ? `Used ${usedIn}× in plans. Plans keep the copy they were given; changes here apply to new placements.`
            : "Build the session from blocks; every target is a percentage of threshold."
        }
      />
      <SessionBuilder
        key={id ?? "new"}
        initial={values}
        errors={errorsOf(actionData)}
        submitLabel={id ? "Save changes" : "Save to shelf"}
      />
    </>
  );
}
