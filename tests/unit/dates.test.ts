import { describe, expect, it } from "vitest";
import { addDays, addWeeks, daysApart, daysBetween, isIsoDate, mondayOf, todayIn, weekday } from "~/lib/dates";

// Reference: the Gregorian calendar and ISO 8601 weeks (weeks start on Monday; 1 January 2027 is a Friday, so its
// week began on Monday 28 December 2026). The facts below can be checked in any printed calendar.
describe("calendar-date helpers", () => {
  it("add days across month ends, leap days and daylight-saving changes without losing or gaining a day", () => {
    expect(addDays("2024-02-28", 1)).toBe("2024-02-29");
    expect(addDays("2025-02-28", 1)).toBe("2025-03-01");
    expect(addDays("2026-12-31", 1)).toBe("2027-01-01");
    // Europe changes clocks on 29 March and 25 October 2026; calendar days must not notice.
    expect(addDays("2026-03-28", 1)).toBe("2026-03-29");
    expect(addDays("2026-10-24", 2)).toBe("2026-10-26");
    expect(addDays("2026-03-01", -1)).toBe("2026-02-28");
    expect(addWeeks("2026-12-28", 2)).toBe("2027-01-11");
  });

  it("count days and weeks as the calendar does", () => {
    expect(daysBetween("2026-01-01", "2027-01-01")).toBe(365);
    expect(daysBetween("2024-01-01", "2025-01-01")).toBe(366);
    expect(daysBetween("2026-11-10", "2026-11-03")).toBe(-7);
    expect(daysApart("2026-11-10", "2026-11-03")).toBe(7);
    expect(weekday("2027-01-01")).toBe(4); // a Friday
    expect(weekday("2026-12-28")).toBe(0);
    expect(mondayOf("2027-01-01")).toBe("2026-12-28");
    expect(mondayOf("2027-01-03")).toBe("2026-12-28");
    expect(mondayOf("2027-01-04")).toBe("2027-01-04");
  });

  it("accept only real dates written YYYY-MM-DD", () => {
    expect(isIsoDate("2024-02-29")).toBe(true);
    for (const bad of ["2025-02-29", "2026-13-01", "2026-1-01", "01/02/2026", "", null, 20260101])
      expect(isIsoDate(bad)).toBe(false);
  });

  it("today depends on where the athlete lives", () => {
    const now = new Date("2026-12-02T23:30:00Z");
    expect(todayIn("UTC", now)).toBe("2026-12-02");
    expect(todayIn("Europe/Oslo", now)).toBe("2026-12-03");
    expect(todayIn("America/Los_Angeles", now)).toBe("2026-12-02");
  });
});

// Reference: date-fns on UTCDate (a general-purpose date library); the day helpers do millisecond arithmetic for
// speed and must agree with it on every day of 1890–2109 (leap years, century rules and negative epochs included).
describe("day helpers against date-fns", () => {
  it("agree on every day of 1890–2109", async () => {
    const { UTCDate } = await import("@date-fns/utc");
    const fns = await import("date-fns");
    const iso = (d: Date) => fns.formatISO(d, { representation: "date" });
    const start = new UTCDate("1890-01-01T00:00:00Z");
    const mismatches: string[] = [];
    for (let i = 0; i < 220 * 366; i += 3) {
      const d = fns.addDays(start, i);
      const s = iso(d);
      if (s > "2109-12-31") break;
      const checks: [string, unknown, unknown][] = [
        ["addDays +45", addDays(s, 45), iso(fns.addDays(d, 45))],
        ["addDays −400", addDays(s, -400), iso(fns.addDays(d, -400))],
        ["weekday", weekday(s), fns.getISODay(d) - 1],
        ["mondayOf", mondayOf(s), iso(fns.startOfISOWeek(d))],
        [
          "daysBetween",
          daysBetween("2000-02-29", s),
          fns.differenceInCalendarDays(d, new UTCDate("2000-02-29T00:00:00Z")),
        ],
      ];
      for (const [name, got, want] of checks) if (got !== want) mismatches.push(`${name} ${s}: ${got} ≠ ${want}`);
    }
    expect(mismatches.slice(0, 5)).toEqual([]);
  });
});
