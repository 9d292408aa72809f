import { z } from "zod";
import { validateBandSet } from "~/lib/training";

// conform sends an empty input as missing; the set check below wants every field as typed, empty included.
const typed = z.string().optional().default("");

/**
 * A coach's band set as the page sends it (`bands[0].name`, …): every row is checked against its neighbours by
 * `validateBandSet`, whose messages land beside the field they name. Shared by the action and the page.
 */
export const bandSetSchema = z
  .object({
    set: typed,
    bands: z.array(z.object({ name: typed, fromPct: typed, toPct: typed, meaning: typed })).default([]),
  })
  .superRefine((v, ctx) => {
    const r = validateBandSet(v.bands);
    if (r.ok) return;
    if (r.errors.form) ctx.addIssue({ code: "custom", message: r.errors.form, path: [] });
    for (const [i, fields] of Object.entries(r.errors.rows))
      for (const [f, message] of Object.entries(fields))
        if (message) ctx.addIssue({ code: "custom", message, path: ["bands", Number(i), f] });
  });

/** Back to the defaults for one set. */
export const restoreBandsSchema = z.object({ set: typed, intent: z.literal("restore") });

/** Said above the rows whenever one is wrong: the browser's check and the action's say the same. */
export const BANDS_NOT_SAVED = "Nothing was saved: check the marked fields.";
