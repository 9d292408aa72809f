import { TrainingInputError } from "~/lib/training/errors";

/**
 * What went wrong, in the domain's words. Services throw these; only the route edge (`~/.server/replies`) turns a
 * kind into an HTTP status, so a service never needs to know it is answering a request.
 */
export type DomainErrorKind =
  | "invalid" // the input cannot be used as given
  | "forbidden" // the viewer's role may not do this at all
  | "not_found" // no such record, or not the viewer's (never told apart)
  | "conflict" // the record's state does not allow it (already used, already on the roster…)
  | "confirm_needed" // allowed, but only once the person confirms (a flagged threshold, a clash)
  | "stale" // the record changed since the viewer read it; `version` is the current one
  | "gone" // it existed, but its content is no longer there
  | "too_large"
  | "unsupported" // a body or file type that is not accepted
  | "unreadable" // the input was well formed but could not be processed in time
  | "rate_limited" // `retryAfterS` says when to try again
  | "upstream" // a provider we depend on refused or could not be reached
  | "busy"; // the server is at capacity for this kind of work

export interface DomainErrorOptions {
  /** The form field the message belongs beside. */
  field?: string;
  /** Further lines (one per problem) for a message that sums several up. */
  details?: string[];
  retryAfterS?: number;
  version?: number;
}

export class DomainError extends Error {
  override name = "DomainError";
  readonly field?: string;
  readonly details?: string[];
  readonly retryAfterS?: number;
  readonly version?: number;
  constructor(
    readonly kind: DomainErrorKind,
    message: string,
    options: DomainErrorOptions = {},
  ) {
    super(message);
    this.field = options.field;
    this.details = options.details;
    this.retryAfterS = options.retryAfterS;
    this.version = options.version;
  }
}

/**
 * The domain failure behind `err`, or null for anything else (a bug, a thrown Response). The engine's input
 * errors stay in the pure library and count as "invalid" here.
 */
export function asDomainError(err: unknown): DomainError | null {
  if (err instanceof DomainError) return err;
  if (err instanceof TrainingInputError) return new DomainError("invalid", err.message);
  return null;
}
