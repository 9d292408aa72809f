import { z } from "zod";
import { isIsoDate } from "~/lib/dates";
import { numberFormat } from "~/lib/format";
export const CURRENCIES = ["EUR", "USD", "GBP"] as const;
export const LEVELS = ["beginner", "intermediate", "advanced"] as const;

export const formatPrice = (cents: number, currency: string) =>
  numberFormat({ style: "currency", currency }).format(cents / 100);

/** Price bounds, checked on the whole-cents value the provider is charged. */
export const MIN_PRICE_CENTS = 50;
export const MAX_PRICE_CENTS = 1_000_000;

/**
 * Reads a typed price ("29.50", "29,5", "1 200") into whole cents, or says what is wrong. More than two decimals is
 * refused rather than rounded: 0.004 must not silently become a free plan.
 */
export function parsePriceCents(input: string): { ok: true; cents: number } | { ok: false; message: string } {
  const text = input
    .trim()
    .replace(/[\s\u00a0]/g, "")
    .replace(",", ".");
  if (!text) return { ok: false, message: "Enter a price." };
  const m = /^(\d{1,7})(?:\.(\d{1,2}))?$/.exec(text);
  if (!m) return { ok: false, message: "Enter the price as a number with at most two decimals, like 29.50." };
  const cents = Number(m[1]) * 100 + Number((m[2] ?? "").padEnd(2, "0"));
  if (cents < MIN_PRICE_CENTS) return { ok: false, message: "The price must be at least 0.50." };
  if (cents > MAX_PRICE_CENTS) return { ok: false, message: "The price can be at most 10,000." };
  return { ok: true, cents };
}

/** What the buyer and the sales table read for each order state. */
export const ORDER_STATUS_LABELS: Record<string, string> = {
  created: "awaiting payment",
  declined: "declined",
  fulfilled: "paid",
  expired: "expired",
  refunded: "refunded",
  needs_review: "needs review",
};

/** The buyer's checkout choice, read by the listing's action and validated in its form. */
export const checkoutSchema = z.object({
  mode: z.enum(["start", "event"], { error: "Choose how to line the plan up." }),
  date: z.string({ error: "Choose a date." }).refine(isIsoDate, "Choose a date."),
  placement: z.enum(["after", "alongside"]).optional(),
});
