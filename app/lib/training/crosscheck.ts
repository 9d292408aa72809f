import { requirePositive, TrainingInputError } from "./errors";
import { daysApart, isIsoDate } from "~/lib/dates";

/**
 * Cross-check of two tests of the same sport and metric taken close together. The difference is given in % of the
 * two estimates' mean (symmetric: it does not matter which test is "first"); for pace it is computed on speed
 * (1 / pace), so a faster pace counts as the higher estimate as it does for power.
 * Agreement bands, common practice (day-to-day variation of a repeated maximal test is a few per cent):
 * within 3 % they agree; 3–6 % they roughly agree (protocol differences are usual at this size); above 6 % they
 * disagree and a third test settles it.
 */
export const CROSS_CHECK_DAYS = 14;
export const AGREE_PCT = 3;
export const ROUGHLY_PCT = 6;

export type Agreement = "agree" | "roughly" | "disagree";

export interface CrossCheck {
  diffPct: number;
  mean: number;
  agreement: Agreement;
  message: string;
}

export function crossCheck(a: number, b: number, metric: "power" | "heart_rate" | "pace"): CrossCheck {
  const x = requirePositive(a, "First estimate");
  const y = requirePositive(b, "Second estimate");
  const [sa, sb] = metric === "pace" ? [1 / x, 1 / y] : [x, y];
  const m = (sa + sb) / 2;
  const diffPct = Math.round((Math.abs(sb - sa) / m) * 1000) / 10;
  const mean = metric === "pace" ? 1 / m : m;
  const agreement: Agreement = diffPct <= AGREE_PCT ? "agree" : diffPct <= ROUGHLY_PCT ? "roughly" : "disagree";
  const message =
    agreement === "agree"
      ? `The two tests agree (${diffPct} % apart): either is a sound threshold, and their mean is the steadiest choice.`
      : agreement === "roughly"
        ? `The two tests roughly agree (${diffPct} % apart). Differences of this size between protocols are usual; prefer the test you paced better, or take their mean.`
        : `The two tests disagree by ${diffPct} %, more than pacing or protocol usually explains. Check both files for a bad day, a pacing slip or a device change, and consider a third test before moving targets.`;
  return { diffPct, mean, agreement, message };
}

export function checkPairWindow(dateA: string, dateB: string): number {
  const days = isIsoDate(dateA) && isIsoDate(dateB) ? daysApart(dateA, dateB) : NaN;
  if (!Number.isFinite(days)) throw new TrainingInputError("out_of_range", "Both tests need a date.");
  return days;
}
