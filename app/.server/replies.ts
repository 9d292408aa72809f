import { data } from "react-router";
import { asDomainError, type DomainError, type DomainErrorKind } from "./errors";
import { httpError, jsonResponse } from "./http";
import { accepted, jsonRefusal, parseSubmission, refuse } from "~/lib/forms";
import type { z } from "zod";
import type { Submission } from "@conform-to/react";

/** The one place a domain failure becomes an HTTP status. */
export const STATUS_FOR_KIND: Record<DomainErrorKind, number> = {
  invalid: 400,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  confirm_needed: 409,
  stale: 409,
  gone: 410,
  too_large: 413,
  unsupported: 415,
  unreadable: 422,
  rate_limited: 429,
  upstream: 502,
  busy: 503,
};

export const statusFor = (kind: DomainErrorKind) => STATUS_FOR_KIND[kind];

/** A domain failure, or the original error thrown on: bugs and thrown Responses are not ours to answer. */
export function domainFailure(err: unknown): DomainError {
  const e = asDomainError(err);
  if (!e) throw err;
  return e;
}

function headersFor(e: DomainError): Record<string, string> {
  return e.retryAfterS ? { "Retry-After": String(e.retryAfterS) } : {};
}

/**
 * Resource routes: `{ error, field?, details?, version? }` with the kind's status. Pages that post JSON read
 * `error` and, for a stale board, the current `version`.
 */
export function jsonFailure(err: unknown): Response {
  const e = domainFailure(err);
  const body: Record<string, unknown> = { error: e.message };
  if (e.field !== undefined) body.field = e.field;
  if (e.details?.length) body.details = e.details;
  if (e.version !== undefined) body.version = e.version;
  const res = jsonResponse(body, statusFor(e.kind));
  for (const [k, v] of Object.entries(headersFor(e))) res.headers.set(k, v);
  return res;
}

/** Page actions: the page's own reply shape, built from the failure, with the kind's status. */
export function pageFailure<T>(err: unknown, reply: (e: DomainError) => T) {
  const e = domainFailure(err);
  return data(reply(e), { status: statusFor(e.kind), headers: headersFor(e) });
}

/** Loaders: the failure as a plain-text error page with the kind's status. */
export function loaderFailure(err: unknown): never {
  const e = domainFailure(err);
  httpError(statusFor(e.kind), e.message);
}

/**
 * Form actions: the failure as the one form reply (conform's), under its field (or `field` when the failure names
 * none), else the form's, with the kind's status and any Retry-After.
 */
export function formFailure(
  err: unknown,
  submission: Submission<unknown, string[], unknown>,
  opts: { field?: string } = {},
) {
  const e = domainFailure(err);
  const field = e.field ?? opts.field;
  return refuse(submission, field ? { fields: { [field]: e.message } } : { form: e.message }, {
    status: statusFor(e.kind),
    headers: headersFor(e),
  });
}

/** Actions that post JSON but answer in the one form reply: the message under its field (or the form's). */
export function jsonFormFailure(err: unknown) {
  const e = domainFailure(err);
  return jsonRefusal(e.message, e.field ?? "", statusFor(e.kind));
}

/**
 * One form intent end to end: parse with its schema (refused with `invalid` above the fields), make the change, and
 * answer the sentence the change returns, or the domain's refusal beside its field (or `opts.field` when the
 * failure names none). The form keeps its values.
 */
export async function submitForm<S extends z.ZodType>(
  form: FormData,
  schema: S,
  invalid: string,
  change: (value: z.output<S>) => Promise<string>,
  opts: { field?: string } = {},
) {
  const submission = parseSubmission(form, schema);
  if (submission.status !== "success") return refuse(submission, { form: invalid });
  try {
    return accepted(submission, await change(submission.value as z.output<S>), { reset: false });
  } catch (err) {
    return formFailure(err, submission, opts);
  }
}
