import { data } from "react-router";
import { z } from "zod";
import type { User } from "~/.server/models";
import { pageFailure } from "~/.server/replies";
import { completeSession } from "~/.server/services/calendar";
import { addComment, commentSchema } from "~/.server/services/comments";
import { parseForm } from "~/lib/forms";

// Form handlers of the two session pages (the athlete's and the coach's view of one scheduled session).

const completeSchema = z
  .object({
    status: z.enum(["done", "skipped", "planned"], { error: "Choose done or skipped." }),
    effortScore: z.coerce.number().int().min(0).max(10).optional(),
    minutes: z.coerce
      .number()
      .min(1, "Minutes must be at least 1.")
      .max(1440, "Minutes must be at most 1440.")
      .optional(),
    comment: z.string().max(1000).default(""),
  })
  .refine((v) => v.status !== "done" || v.effortScore !== undefined, {
    message: "Choose how hard it felt (0–10).",
    path: ["effortScore"],
  });

export async function completeFromForm(athlete: User, sessionId: number, form: FormData) {
  const parsed = parseForm(completeSchema, form);
  if (!parsed.ok)
    return data({ ok: false, message: "Check the form.", fieldErrors: parsed.fieldErrors }, { status: 400 });
  try {
    const s = await completeSession(athlete.id, sessionId, {
      status: parsed.data.status,
      effortScore: parsed.data.effortScore ?? null,
      minutes: parsed.data.minutes ?? null,
      comment: parsed.data.comment,
    });
    return {
      ok: true,
      message:
        s.status === "done"
          ? "Marked done. Nice work."
          : s.status === "skipped"
            ? "Marked skipped."
            : "Back to planned.",
      fieldErrors: {},
    };
  } catch (err) {
    return pageFailure(err, (e) => ({ ok: false, message: e.message, fieldErrors: {} }));
  }
}

/** A new message in the session's thread, from either side. */
export async function commentAction(viewer: User, sessionId: number, form: FormData) {
  const parsed = parseForm(commentSchema, form);
  if (!parsed.ok)
    return data({ ok: false, message: "Check the message.", fieldErrors: parsed.fieldErrors }, { status: 400 });
  try {
    await addComment(viewer, sessionId, parsed.data.body);
    return { ok: true, message: "Sent.", fieldErrors: {} };
  } catch (err) {
    return pageFailure(err, (e) => ({ ok: false, message: e.message, fieldErrors: {} }));
  }
}
