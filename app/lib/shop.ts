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

/** A coach's listing, read by the Selling page's action and validated in its forms. */
const priceField = z.string({ error: "Enter a price." }).transform((v, ctx) => {
  const r = parsePriceCents(v);
  if (!r.ok) {
    ctx.addIssue({ code: "custom", message: r.message });
    return z.NEVER;
  }
  return r.cents;
});

const listingFields = {
  title: z
    .string()
    .trim()
    .min(3, "Give the plan a title of at least 3 characters.")
    .max(120, "Keep the title under 120 characters."),
  description: z
    .string()
    .trim()
    .min(10, "Describe the plan in a sentence or two.")
    .max(4000, "Keep the description under 4,000 characters."),
  coverText: z
    .string()
    .trim()
    .max(200, "Keep the cover text under 200 characters.")
    .optional()
    .transform((v) => v || null),
  level: z.enum(LEVELS, { error: "Choose a level." }),
  /** Typed as "29.50"; parsed to whole cents (the output is cents) and validated on the cents value. */
  price: priceField,
};

export const listingSchema = z.object({
  planId: z.coerce.number().int().positive("Choose one of your plans."),
  ...listingFields,
  currency: z.enum(CURRENCIES, { error: "Choose a currency." }),
});
export const listingEditSchema = z.object({ listingId: z.coerce.number().int().positive(), ...listingFields });

/** A listing as the services take it: the parsed price under the column's name. */
export type InCents<T extends { price: number }> = Omit<T, "price"> & { priceCents: number };
export const inCents = <T extends { price: number }>({ price, ...rest }: T): InCents<T> => ({
  ...rest,
  priceCents: price,
});

/** The buttons that act on one order or one listing by its id. */
export const orderIdSchema = z.object({ orderId: z.coerce.number().int().positive() });
export const listingIdSchema = z.object({ listingId: z.coerce.number().int().positive() });
