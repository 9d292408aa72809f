import { z } from "zod";

// Shared by the feed page's action and its forms (conform validates in the browser with the same schemas).

const TIME_MESSAGE = "Use a time like 06:30, or leave it empty for all day.";
const usualTime = z
  .string()
  .trim()
  .regex(/^([01]\d|2[0-3]):[0-5]\d$/, TIME_MESSAGE)
  .optional();

/** One usual training time per weekday, Monday first (`time-0` … `time-6`); an empty day stays all-day. */
export const trainingTimesSchema = z.object({
  "time-0": usualTime,
  "time-1": usualTime,
  "time-2": usualTime,
  "time-3": usualTime,
  "time-4": usualTime,
  "time-5": usualTime,
  "time-6": usualTime,
});

/** The seven times in weekday order, `null` where the day has none. */
export function trainingTimesOf(value: z.output<typeof trainingTimesSchema>): (string | null)[] {
  return Array.from({ length: 7 }, (_, d) => value[`time-${d}` as keyof typeof value] ?? null);
}

/** The reminder before timed sessions; none chosen sends nothing (conform reads an empty select as missing). */
export const alarmSchema = z.object({
  alarmMinutes: z
    .enum(["15", "30", "60", "120"], { error: "Choose a reminder from the list." })
    .optional()
    .transform((v) => (v === undefined ? null : Number(v))),
});

/** Making a new link or turning the link off: the button says which. */
export const feedLinkSchema = z.object({ intent: z.enum(["rotate", "revoke"]) });
