import { UTCDate } from "@date-fns/utc";
import { dateFormat } from "~/lib/format";
import { addWeeks as addWeeksTo, formatISO, subDays as subDaysFrom } from "date-fns";

/**
 * Calendar-date helpers on YYYY-MM-DD strings. Arithmetic is date-fns on UTCDate, so no daylight-saving shift can
 * move a day; every other module does its date arithmetic through these.
 */
const day = (iso: string) => new UTCDate(`${iso}T00:00:00Z`);
const iso = (d: Date) => formatISO(d, { representation: "date" });

// The day helpers below run per row and per day in long series: on UTC midnights a day is exactly 86,400,000 ms
// (no daylight saving in UTC) and toISOString gives the same YYYY-MM-DD as date-fns' formatISO for years 0–9999, so
// plain millisecond arithmetic gives date-fns' results without building date objects per call.
const DAY_MS = 86_400_000;
export const toMs = (isoDay: string) => Date.parse(`${isoDay}T00:00:00Z`);
export const fromMs = (ms: number) => new Date(ms).toISOString().slice(0, 10);
export const addDays = (isoDay: string, n: number) => fromMs(toMs(isoDay) + n * DAY_MS);
export const addWeeks = (isoDay: string, n: number) => iso(addWeeksTo(day(isoDay), n));
export const daysBetween = (a: string, b: string) => Math.round((toMs(b) - toMs(a)) / DAY_MS);
/** 0 = Monday … 6 = Sunday (1 January 1970 was a Thursday). */
export const weekday = (isoDay: string) => (((Math.floor(toMs(isoDay) / DAY_MS) + 3) % 7) + 7) % 7;
export const mondayOf = (isoDay: string) => fromMs(toMs(isoDay) - weekday(isoDay) * DAY_MS);
export const isIsoDate = (s: unknown): s is string =>
  typeof s === "string" && /^\d{4}-\d{2}-\d{2}$/.test(s) && Number.isFinite(toMs(s)) && fromMs(toMs(s)) === s;
/** `n` consecutive days from `first`; built in one pass because long series (years of days) ask for it. */
export function dayRange(first: string, n: number): string[] {
  const start = toMs(first);
  return Array.from({ length: n }, (_, i) => fromMs(start + i * 86_400_000));
}
/** The instant `n` days before `now` (for "within the last n days" checks on timestamps). */
export const daysAgo = (n: number, now = new Date()) => subDaysFrom(now, n);
/** Whole days from one instant to another, rounded, e.g. between two test dates given as YYYY-MM-DD. */
export const daysApart = (a: string, b: string) => Math.abs(daysBetween(a, b));

/** Today's date where the athlete lives. */
export function todayIn(timeZone: string, now = new Date()): string {
  const parts = dateFormat({ timeZone, year: "numeric", month: "2-digit", day: "2-digit" }, "en-CA").formatToParts(now);
  const get = (t: string) => parts.find((p) => p.type === t)!.value;
  return `${get("year")}-${get("month")}-${get("day")}`;
}

export function formatDay(
  iso: string,
  opts: Intl.DateTimeFormatOptions = { weekday: "short", day: "numeric", month: "short" },
) {
  return dateFormat({ ...opts, timeZone: "UTC" }).format(new Date(toMs(iso)));
}
