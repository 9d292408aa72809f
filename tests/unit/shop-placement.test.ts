import { describe, expect, it } from "vitest";
import { firstMondayAfter, overlapping, spanOf, weekOneMonday } from "~/lib/placement";
import { formatPrice, parsePriceCents } from "~/lib/shop";

// Weekdays and Mondays checked with Python's datetime (date.weekday / timedelta), a general-purpose reference.
describe("lining a plan up on the calendar", () => {
  it.each([
    ["2026-12-02", "2026-12-07"], // Wednesday → next Monday
    ["2026-12-07", "2026-12-07"], // a Monday stays
    ["2027-01-24", "2027-01-25"], // Sunday → next day
    ["2026-12-31", "2027-01-04"], // across the year
  ])("starting on or after %s begins Monday %s", (date, monday) => {
    expect(weekOneMonday("start", date, 12)).toBe(monday);
  });

  it("ending in an event's week puts the last week on that week", () => {
    // Event on Sunday 2027-03-28 (Python: date(2027,3,28).weekday() == 6): its Monday is 2027-03-22; 4 weeks back 3 more.
    expect(spanOf("event", "2027-03-28", 4)).toEqual({ from: "2027-03-01", to: "2027-03-28" });
  });

  it("finds overlaps inclusively and the first Monday after them", () => {
    const current = [{ name: "A", from: "2026-12-03", to: "2027-01-24" }];
    expect(overlapping(current, { from: "2027-01-24", to: "2027-02-20" })).toHaveLength(1);
    expect(overlapping(current, { from: "2027-01-25", to: "2027-02-21" })).toHaveLength(0);
    expect(firstMondayAfter(current)).toBe("2027-01-25");
    expect(firstMondayAfter([{ name: "B", from: "2027-01-01", to: "2027-01-20" }, ...current])).toBe("2027-01-25");
  });
});

describe("prices in whole cents", () => {
  it.each([
    ["29.50", 2950],
    ["29,5", 2950],
    ["0.50", 50],
    ["10000", 1_000_000],
    ["1 200", 120_000],
  ])("%s is %i cents", (text, cents) => expect(parsePriceCents(text)).toEqual({ ok: true, cents }));
  it.each(["0.001", "0.004", "1e-300", "0.49", "0", "10000.01", "", "-1", "12.345", "Infinity", "NaN"])(
    "%s is refused",
    (text) => {
      expect(parsePriceCents(text).ok).toBe(false);
    },
  );
  it("formats with the currency's symbol (Intl, en-GB)", () => {
    expect(formatPrice(2950, "EUR")).toBe("€29.50");
    expect(formatPrice(1_000_000, "GBP")).toBe("£10,000.00");
  });
});
