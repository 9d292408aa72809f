import { z } from "zod";
import { requireUser } from "~/.server/auth";
import { requireAthleteFor } from "~/.server/access";
import { preview } from "~/.server/services/field-test-proposal";
import { jsonFailure } from "~/.server/replies";
import { protocolSchema } from "~/lib/field-tests";
import { jsonResponse as json, requireJson } from "~/.server/http";
import type { Route } from "./+types/tests-preview";

export const submissionSchema = z.object({
  protocol: protocolSchema,
  inputs: z.unknown().optional(),
  uploadId: z.number().int().positive().nullish(),
  windowStartS: z.number().int().min(0).nullish(),
  testedOn: z.string(),
});

/** What saving this test would do: the proposed threshold beside the current one, counts, and examples. Changes nothing. */
export async function action({ request }: Route.ActionArgs) {
  const viewer = await requireUser(request);
  const athlete = await requireAthleteFor(viewer, new URL(request.url).searchParams.get("athleteId"));
  requireJson(request);
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    return json({ error: "Send the test as JSON." }, 400);
  }
  const parsed = submissionSchema.safeParse(body);
  if (!parsed.success) return json({ error: parsed.error.issues[0].message }, 400);
  try {
    return json(await preview(athlete, parsed.data));
  } catch (err) {
    return jsonFailure(err);
  }
}
