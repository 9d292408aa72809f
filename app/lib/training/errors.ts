/** Why an input was refused; the UI can branch on `code` and show `message` as it is. */
export type TrainingErrorCode =
  | "not_a_number"
  | "out_of_range"
  | "too_short"
  | "too_few_efforts"
  | "inconsistent"
  | "no_power"
  | "no_heart_rate"
  | "empty_file"
  | "unreadable_file"
  | "unsupported_file"
  | "not_a_ramp";

export class TrainingInputError extends Error {
  override name = "TrainingInputError";
  constructor(
    readonly code: TrainingErrorCode,
    message: string,
  ) {
    super(message);
  }
}

/** Refuses NaN, ±Infinity and values outside [min, max] with a message naming the field. */
export function requireFinite(
  value: number,
  label: string,
  opts: { min?: number; max?: number; exclusiveMin?: boolean } = {},
): number {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new TrainingInputError("not_a_number", `${label} must be a number.`);
  }
  const { min, max, exclusiveMin } = opts;
  if (min !== undefined && (exclusiveMin ? value <= min : value < min)) {
    throw new TrainingInputError("out_of_range", `${label} must be ${exclusiveMin ? "more than" : "at least"} ${min}.`);
  }
  if (max !== undefined && value > max) {
    throw new TrainingInputError("out_of_range", `${label} must be at most ${max}.`);
  }
  return value;
}

export const requirePositive = (value: number, label: string, max?: number) =>
  requireFinite(value, label, { min: 0, exclusiveMin: true, max });
