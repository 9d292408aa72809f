import { TZDate } from "@date-fns/tz";
import { describe, expect, it } from "vitest";
import { zonedInstant, zoneOffsetMinutes } from "~/lib/zone-time";

// Reference library: @date-fns/tz's TZDate, which the feed used before, built from the same wall-clock fields.
const reference = (zone: string, y: number, m: number, d: number, hh: number, mm: number) =>
  new TZDate(y, m - 1, d, hh, mm, 0, zone);

const ZONES = ["Europe/Berlin", "America/New_York", "Australia/Lord_Howe", "Asia/Kolkata", "Pacific/Chatham", "UTC"];
// Change days of 2026 in those zones (tz database), each checked at every quarter hour.
const CHANGE_DAYS = ["2026-03-08", "2026-03-29", "2026-04-05", "2026-09-27", "2026-10-04", "2026-10-25", "2026-11-01"];

describe("zonedInstant", () => {
  it("agrees with TZDate on every quarter hour of the change days, gaps and overlaps included", () => {
    for (const zone of ZONES)
      for (const day of CHANGE_DAYS) {
        const [y, m, d] = day.split("-").map(Number);
        for (let q = 0; q < 96; q++) {
          const hh = Math.floor(q / 4);
          const mm = (q % 4) * 15;
          const ref = reference(zone, y, m, d, hh, mm);
          const got = new TZDate(zonedInstant(zone, y, m, d, hh, mm), zone);
          // The wall-clock fields are what the feed writes; in an overlap either instant shows the same fields.
          expect([got.getFullYear(), got.getMonth(), got.getDate(), got.getHours(), got.getMinutes()]).toEqual([
            ref.getFullYear(),
            ref.getMonth(),
            ref.getDate(),
            ref.getHours(),
            ref.getMinutes(),
          ]);
          if (got.getTime() !== ref.getTime())
            expect(Math.abs(got.getTime() - ref.getTime())).toBeLessThanOrEqual(3_600_000);
        }
      }
  });

  it("agrees with TZDate at one time a day over two years", () => {
    for (const zone of ZONES)
      for (let k = 0; k < 730; k++) {
        const day = new Date(Date.UTC(2026, 0, 1 + k));
        const [y, m, d] = [day.getUTCFullYear(), day.getUTCMonth() + 1, day.getUTCDate()];
        expect(zonedInstant(zone, y, m, d, 7, 30)).toBe(reference(zone, y, m, d, 7, 30).getTime());
      }
  });

  it("reads offsets east positive, including half and three-quarter hours", () => {
    // From the tz database: Berlin +1/+2, Kolkata +5:30, Chatham +12:45 in southern winter, New York −4 in summer.
    expect(zoneOffsetMinutes("Europe/Berlin", Date.UTC(2026, 0, 15))).toBe(60);
    expect(zoneOffsetMinutes("Europe/Berlin", Date.UTC(2026, 6, 15))).toBe(120);
    expect(zoneOffsetMinutes("Asia/Kolkata", Date.UTC(2026, 6, 15))).toBe(330);
    expect(zoneOffsetMinutes("Pacific/Chatham", Date.UTC(2026, 6, 15))).toBe(765);
    expect(zoneOffsetMinutes("America/New_York", Date.UTC(2026, 6, 15))).toBe(-240);
    expect(zoneOffsetMinutes("UTC", Date.UTC(2026, 6, 15, 12, 0, 0, 500))).toBe(0);
  });
});
