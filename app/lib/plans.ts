import { z } from "zod";
import { isIsoDate } from "~/lib/dates";
import { PHASES } from "~/lib/training";

// Labels live in a module without zod, so pages that only show plans (the board) do not load the schemas.
export { DAY_LONG, DAY_NAMES, PHASE_LABEL, PLAN_SPORTS } from "./plan-labels";
import { DAY_NAMES, PLAN_SPORTS } from "./plan-labels";

// The `error` speaks for an empty field too: conform sends an empty input as missing, not as "".
const isoDate = z.string({ error: "Choose a date." }).regex(/^\d{4}-\d{2}-\d{2}$/, "Choose a date.");

export const newPlanSchema = z.object({
  name: z
    .string({ error: "Give the plan a name." })
    .trim()
    .min(1, "Give the plan a name.")
    .max(120, "Use at most 120 characters."),
  sport: z.enum(PLAN_SPORTS, { error: "Choose a sport." }),
  description: z.string().trim().max(2000).default(""),
  alignment: z.enum(["start", "event"], { error: "Choose how the plan is aligned." }),
  date: isoDate,
  weeks: z.coerce
    .number({ error: "Enter the number of weeks." })
    .int("Use whole weeks.")
    .min(4, "A plan runs at least 4 weeks.")
    .max(104, "A plan runs at most 104 weeks."),
  weeklyHours: z.coerce
    .number({ error: "Enter weekly hours." })
    .gt(0, "Weekly hours must be more than 0.")
    .max(40, "Use at most 40 hours a week."),
  pattern: z.enum(["3:1", "2:1"], { error: "Choose 3:1 or 2:1." }),
  testEveryWeeks: z.coerce.number().int().min(4, "Test every 4 to 8 weeks.").max(8, "Test every 4 to 8 weeks."),
});
export type NewPlanInput = z.infer<typeof newPlanSchema>;

export const weekEditSchema = z.object({
  weekId: z.coerce.number().int().positive(),
  phase: z.enum(PHASES, { error: "Choose a phase." }),
  recovery: z
    .union([z.literal("on"), z.literal("")])
    .optional()
    .transform((v) => v === "on"),
  test: z
    .union([z.literal("on"), z.literal("")])
    .optional()
    .transform((v) => v === "on"),
  plannedHours: z.coerce
    .number({ error: "Enter hours." })
    .min(0, "Hours cannot be negative.")
    .max(60, "Use at most 60 hours."),
  notes: z.string().max(1000, "Use at most 1000 characters.").default(""),
});

export const phaseRangeSchema = z
  .object({
    phase: z.enum(PHASES, { error: "Choose a phase." }),
    fromWeek: z.coerce.number().int().min(1, "Weeks start at 1."),
    toWeek: z.coerce.number().int().min(1, "Weeks start at 1."),
  })
  .refine((v) => v.toWeek >= v.fromWeek, { message: "The last week must not be before the first.", path: ["toWeek"] });

export const recurrenceSchema = z
  .object({
    sessionId: z.coerce.number({ error: "Choose a session." }).int().positive("Choose a session."),
    // One ticked box arrives as a single value, none as nothing.
    days: z.preprocess(
      (v) => (v === undefined ? [] : Array.isArray(v) ? v : [v]),
      z.array(z.coerce.number().int().min(0).max(6)).min(1, "Choose at least one day.").max(7),
    ),
    fromWeek: z.coerce.number().int().min(1, "Weeks start at 1."),
    toWeek: z.coerce.number().int().min(1, "Weeks start at 1."),
    timeOfDay: z
      .string()
      .regex(/^([01]\d|2[0-3]):[0-5]\d$/, "Use a time like 06:30.")
      .optional()
      .or(z.literal("").transform(() => undefined)),
  })
  .refine((v) => v.toWeek >= v.fromWeek, { message: "The last week must not be before the first.", path: ["toWeek"] });

const loadFactor = z.coerce
  .number({ error: "Enter a load factor." })
  .min(0.3, "Use a load factor from 0.3 to 2.")
  .max(2, "Use a load factor from 0.3 to 2.");

/** A week as the whole table sends it: the week edit plus its load factor. */
export const bulkWeekSchema = weekEditSchema.extend({ loadFactor });

const WEEK_FIELDS = ["phase", "recovery", "test", "plannedHours", "loadFactor", "notes"] as const;

/**
 * The week table's one form: each week's fields carry its id (`plannedHours-12`), so the schema is drawn from the
 * ids the table shows; the action draws it from the ids sent, and every week is checked before anything is saved.
 */
export function weekTableSchema(weekIds: number[]) {
  const shape: Record<string, z.ZodType> = {};
  for (const id of weekIds) for (const f of WEEK_FIELDS) shape[`${f}-${id}`] = bulkWeekSchema.shape[f];
  return z.object(shape);
}

/** The edits of a checked week table, one per week, in the shape `updateWeeks` takes. */
export function weekTableEdits(weekIds: number[], value: Record<string, unknown>) {
  return weekIds.map((weekId) => {
    const w = Object.fromEntries(WEEK_FIELDS.map((f) => [f, value[`${f}-${weekId}`]]));
    return { weekId, ...w } as z.output<typeof bulkWeekSchema>;
  });
}

/** Said beside the table's Save whenever a field is wrong: the browser's check and the action's say the same. */
export const NOTHING_SAVED = "Nothing was saved: fix the marked fields.";

/** Phase, hours and load factor for a run of weeks; an empty field keeps what each week has. */
export const rangeSchema = z
  .object({
    fromWeek: z.coerce.number().int().min(1, "Weeks start at 1."),
    toWeek: z.coerce.number().int().min(1, "Weeks start at 1."),
    phase: z.union([z.literal(""), z.enum(PHASES)]).default(""),
    plannedHours: z
      .union([
        z.literal(""),
        z.coerce.number({ error: "Enter hours." }).min(0, "Hours cannot be negative.").max(60, "Use at most 60 hours."),
      ])
      .default(""),
    loadFactor: z.union([z.literal(""), loadFactor]).default(""),
  })
  .refine((v) => v.toWeek >= v.fromWeek, { message: "The last week must not be before the first.", path: ["toWeek"] });

export const renameSchema = z.object({
  name: z.string({ error: "Give the plan a name." }).trim().min(1, "Give the plan a name.").max(120),
  description: z.string().trim().max(2000).default(""),
});

/** "every Tue and Thu, weeks 3–8" */
export function recurrenceSummary(days: number[], fromWeek: number, toWeek: number): string {
  const names = [...new Set(days)].sort().map((d) => DAY_NAMES[d]);
  const list = names.length <= 1 ? names.join("") : `${names.slice(0, -1).join(", ")} and ${names.at(-1)}`;
  return `every ${list}, ${fromWeek === toWeek ? `week ${fromWeek}` : `weeks ${fromWeek}–${toWeek}`}`;
}

/** Placing a plan on athletes' calendars; the choices arrive once the coach has seen what placing would do. */
export const assignSchema = z
  .object({
    athleteIds: z.preprocess(
      (v) => (v === undefined ? [] : Array.isArray(v) ? v : [v]),
      z.array(z.coerce.number().int().positive()).min(1, "Tick at least one athlete."),
    ),
    mode: z.enum(["start", "event"], { error: "Choose how to align the plan." }),
    date: z.string({ error: "Choose a date." }).refine(isIsoDate, "Choose a date."),
    // Present once the coach has seen the checks and answered them.
    decided: z.literal("1").optional(),
    overlap: z.enum(["replace", "alongside"], { error: "Choose replace or alongside." }).optional(),
    replaceFrom: z
      .string()
      .refine(isIsoDate, "Choose the date to replace from.")
      .optional()
      .or(z.literal("").transform(() => undefined)),
    confirmSports: z.literal("on").optional(),
    confirmTests: z.literal("on").optional(),
  })
  .refine((v) => v.overlap !== "replace" || v.replaceFrom, {
    path: ["replaceFrom"],
    message: "Choose the date to replace from.",
  });

/** Pushing plan changes to the calendars that follow it: nothing to fill in, the button says it all. */
export const pushSchema = z.object({ intent: z.literal("push") });
