import { dateFormat } from "~/lib/format";

/**
 * Wall-clock times in IANA zones through one cached Intl.DateTimeFormat per zone. A feed rebuild converts hundreds
 * of session times; building each through a zoned date object took several offset lookups per event.
 */
const format = (zone: string) =>
  dateFormat(
    {
      timeZone: zone,
      hourCycle: "h23",
      year: "numeric",
      month: "numeric",
      day: "numeric",
      hour: "numeric",
      minute: "numeric",
      second: "numeric",
    },
    "en-US",
  );

/** The zone's offset from UTC at an instant, in minutes (east positive: Berlin in summer is 120). */
export function zoneOffsetMinutes(zone: string, ms: number): number {
  const p: Record<string, number> = {};
  for (const { type, value } of format(zone).formatToParts(ms)) if (type !== "literal") p[type] = Number(value);
  const wall = Date.UTC(p.year, p.month - 1, p.day, p.hour, p.minute, p.second);
  return Math.round((wall - (ms - (((ms % 1000) + 1000) % 1000))) / 60_000);
}

/**
 * The instant of a wall-clock time in a zone. A time inside a spring-forward gap does not exist; it moves forward
 * by the gap (02:30 on Berlin's change day is 03:30 summer time), as RFC 5545 §3.3.5 reads such a time and as
 * @date-fns/tz's TZDate does. A time in the autumn overlap is the later (standard-time) one.
 */
export function zonedInstant(zone: string, y: number, month: number, d: number, hh: number, mm: number): number {
  const wall = Date.UTC(y, month - 1, d, hh, mm);
  const first = zoneOffsetMinutes(zone, wall);
  const guess = wall - first * 60_000;
  const second = zoneOffsetMinutes(zone, guess);
  if (second === first) return guess;
  const retry = wall - second * 60_000;
  const third = zoneOffsetMinutes(zone, retry);
  if (third === second) return retry;
  // In a gap the two offsets straddle the change: the earlier (smaller) one moves the time forward.
  return wall - Math.min(second, third) * 60_000;
}
