import type { User } from "~/.server/models";
import { formFailure } from "~/.server/replies";
import { completeSession } from "~/.server/services/calendar";
import { addComment } from "~/.server/services/comments";
import { accepted, parseSubmission, refuse } from "~/lib/forms";
import { commentSchema, completeSchema } from "~/lib/session-forms";

// Form handlers of the two session pages (the athlete's and the coach's view of one scheduled session).

export async function completeFromForm(athlete: User, sessionId: number, form: FormData) {
  const submission = parseSubmission(form, completeSchema);
  if (submission.status !== "success") return refuse(submission, { form: "Check the form." });
  const { status, effortScore, minutes, comment } = submission.value;
  try {
    const s = await completeSession(athlete.id, sessionId, {
      status,
      effortScore: effortScore ?? null,
      minutes: minutes ?? null,
      comment,
    });
    const message =
      s.status === "done" ? "Marked done. Nice work." : s.status === "skipped" ? "Marked skipped." : "Back to planned.";
    // The fields keep what was recorded, so the athlete sees it and can correct it.
    return accepted(submission, message, { reset: false });
  } catch (err) {
    return formFailure(err, submission);
  }
}

/** A new message in the session's thread, from either side. */
export async function commentAction(viewer: User, sessionId: number, form: FormData) {
  const submission = parseSubmission(form, commentSchema);
  if (submission.status !== "success") return refuse(submission);
  try {
    await addComment(viewer, sessionId, submission.value.body);
    // The box empties for the next message.
    return accepted(submission, "Sent.");
  } catch (err) {
    return formFailure(err, submission, { field: "body" });
  }
}
