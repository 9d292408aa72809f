import type { Submission, SubmissionResult } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data } from "react-router";
import type { z } from "zod";

/**
 * The one reply shape of every form action: conform's `SubmissionResult`, sent with `data(…, { status })`.
 * Components hand it to `useForm({ lastResult })`; the same zod schema validates in the browser (when scripts run)
 * and again in the action, which is the one that counts.
 */
export type FormReply = SubmissionResult<string[]>;

/**
 * A form action's answer as a component shared by pages reads it: the reply, plus the sentence `accepted()` adds.
 * Components outside a route module type their fetcher with this, so they need not import the route (a route
 * imports its components, never the other way round).
 */
export type FormAnswer = FormReply & { message?: string };

/** A one-time note carried across a redirect (`.server/flash.ts`) and shown by the root's toast. */
export type Toast = { tone: "ok" | "error"; message: string };

/** Secrets are never sent back to refill a form. */
const SECRET = /password|confirm|code|secret/i;

export function parseSubmission<S extends z.ZodType>(form: FormData, schema: S) {
  return parseWithZod(form, { schema });
}

/**
 * Refuses a submission: the schema's own messages, or one from the domain (a field's, or the form's under
 * `form`). Nothing was written; the values come back (secrets left out) so a page without scripts refills them.
 */
export function refuse(
  submission: Submission<unknown, string[], unknown>,
  errors: { form?: string; fields?: Record<string, string> } = {},
  init: { status?: number; headers?: HeadersInit } = {},
) {
  const hideFields = Object.keys(submission.payload).filter((k) => SECRET.test(k));
  const fieldErrors = Object.fromEntries(Object.entries(errors.fields ?? {}).map(([k, v]) => [k, [v]]));
  const reply = submission.reply({ hideFields, ...(errors.form ? { formErrors: [errors.form] } : {}), fieldErrors });
  return data(reply as FormReply, { status: init.status ?? 400, headers: init.headers });
}

/**
 * Success that stays on the page (fetcher forms): `message` says what happened. The form resets for the next entry,
 * unless it edits a record and should keep showing what was saved (`{ reset: false }`).
 */
export function accepted(
  submission: Submission<unknown, string[], unknown>,
  message?: string,
  opts: { reset?: boolean } = {},
) {
  const reply = submission.reply(opts.reset === false ? {} : { resetForm: true }) as FormReply;
  return { ...reply, status: "success" as const, message };
}

/** The first message of a field (or the form's, under `""`) in a reply. */
export function messageOf(reply: FormReply | undefined | null, field = ""): string | undefined {
  return reply?.error?.[field]?.[0] ?? undefined;
}

/**
 * The same reply for an action that reads a JSON body (no FormData for conform to parse): the message sits under
 * its field, or under `""` for the whole form.
 */
export function jsonRefusal(message: string, field = "", status = 400) {
  return data({ status: "error", error: { [field]: [message] } } as FormReply, { status });
}

/** The first message in a reply, whichever field it belongs to (for forms that show one message). */
export function firstMessage(reply: FormReply | undefined | null): string | undefined {
  for (const messages of Object.values(reply?.error ?? {})) if (messages?.[0]) return messages[0];
  return undefined;
}

/** First message per field of a reply, the form's under `form`: for editors that place messages themselves. */
export function errorsOf(reply: FormReply | undefined | null): Record<string, string | undefined> {
  const out: Record<string, string | undefined> = {};
  for (const [k, v] of Object.entries(reply?.error ?? {})) if (v?.[0]) out[k === "" ? "form" : k] = v[0];
  return out;
}
