import { z } from "zod";
import { saveTest } from "~/.server/services/field-tests";
import { jsonFormFailure } from "~/.server/replies";
import { redirectWithToast } from "~/.server/flash";
import type { User } from "~/.server/models";
import { formatThreshold as show, THRESHOLD_LABEL } from "~/lib/band-table";
import { protocolSchema } from "~/lib/field-tests";
import { jsonRefusal } from "~/lib/forms";

// The page posts JSON (the live preview and the upload need scripts anyway, and the same body is the API's), so
// the reply is built by hand in the one form shape rather than by conform's parser.
const saveSchema = z.object({
  protocol: protocolSchema,
  inputs: z.unknown().optional(),
  uploadId: z.number().int().positive().nullish(),
  windowStartS: z.number().int().min(0).nullish(),
  testedOn: z.string(),
  readiness: z.unknown().optional(),
  requestKey: z.string().max(64).nullish(),
  confirmed: z.boolean().nullish(),
});

type Report = Awaited<ReturnType<typeof saveTest>>["report"];

/** What the saved test changed, for the note on the tests page. */
export function savedMessage(report: Report, confirmer: string) {
  if (!report) return "Saved.";
  const example = report.examples[0];
  return [
    `Saved. ${THRESHOLD_LABEL[`${report.sport}:${report.metric}`]} is now ${show(report.newValue ?? 0, report.unit)}`,
    report.oldValue ? ` (was ${show(report.oldValue, report.unit)})` : "",
    `: ${report.sessionsChanged} planned sessions, ${report.blocksChanged} steps rescaled.`,
    example ? ` For example ${example.name} on ${example.date}: ${example.before} → ${example.after}.` : "",
    report.guard?.flagged && report.confirmedBy
      ? ` ${confirmer} confirmed this change after the plausibility check.`
      : "",
  ].join("");
}

/** Saves the test and rescales; the tests page then shows what changed, once. */
export async function saveFromRequest(request: Request, athlete: User, viewer: User, base: string) {
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    return jsonRefusal("The test could not be read; reload and try again.");
  }
  const parsed = saveSchema.safeParse(body);
  if (!parsed.success) return jsonRefusal(parsed.error.issues[0].message, parsed.error.issues[0].path.join("."));
  try {
    const { report } = await saveTest(athlete, viewer, parsed.data);
    return redirectWithToast(request, `${base}/tests`, savedMessage(report, viewer.name));
  } catch (err) {
    return jsonFormFailure(err);
  }
}
