import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { timeMs } from "~/lib/training/activity-series";

const pad = (n: number, width: number) => String(n).padStart(width, "0");

/** Reference: the engine's own Date.parse (ECMAScript date time string format). */
describe("timeMs reads time stamps as Date.parse does", () => {
  it("on UTC stamps with and without milliseconds, fields in and out of range", () => {
    const stamp = fc
      .record({
        year: fc.integer({ min: 0, max: 9999 }),
        month: fc.integer({ min: 0, max: 99 }),
        day: fc.integer({ min: 0, max: 99 }),
        hour: fc.integer({ min: 0, max: 99 }),
        minute: fc.integer({ min: 0, max: 99 }),
        second: fc.integer({ min: 0, max: 99 }),
        milli: fc.option(fc.integer({ min: 0, max: 999 }), { nil: undefined }),
      })
      .map(
        (s) =>
          `${pad(s.year, 4)}-${pad(s.month, 2)}-${pad(s.day, 2)}T${pad(s.hour, 2)}:${pad(s.minute, 2)}:${pad(s.second, 2)}` +
          `${s.milli === undefined ? "" : `.${pad(s.milli, 3)}`}Z`,
      );
    fc.assert(
      fc.property(stamp, (s) => {
        expect(timeMs(s)).toBe(Date.parse(s));
      }),
      { numRuns: 2000 },
    );
  });

  it("on realistic stamps, including month ends and leap days", () => {
    const ms = fc.integer({ min: Date.UTC(1990, 0, 1), max: Date.UTC(2100, 0, 1) });
    fc.assert(
      fc.property(ms, fc.boolean(), (t, whole) => {
        const s = new Date(whole ? t - (t % 1000) : t).toISOString().replace(whole ? ".000Z" : "", whole ? "Z" : "");
        expect(timeMs(s)).toBe(Date.parse(s));
        expect(timeMs(s)).toBe(whole ? t - (t % 1000) : t);
      }),
      { numRuns: 2000 },
    );
    for (const s of [
      "2024-02-29T12:00:00Z",
      "2023-02-29T12:00:00Z",
      "2026-04-31T00:00:00Z",
      "2026-12-31T23:59:59.999Z",
    ])
      expect(timeMs(s)).toBe(Date.parse(s));
  });

  it("on other layouts and damaged text, which go to Date.parse", () => {
    const odd = fc.oneof(
      fc.string({ maxLength: 30 }),
      fc.stringMatching(/^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,6})?)?(Z|[+-]\d{2}:\d{2})?$/),
      fc.constantFrom(
        "2026-01-01T24:00:00Z",
        "2026-01-01T23:59:60Z",
        "2026-01-01T00:00:00.1234Z",
        "2026-01-01T00:00:00.12Z",
        "2026-01-01T00:00:00z",
        "2026-01-01T00:00:00+01:00",
        "2026-1-01T00:00:00.000Z",
        "20a6-01-01T00:00:00Z",
        "2026-01-01T00:00:0-Z",
        "",
      ),
    );
    fc.assert(
      fc.property(odd, (s) => {
        expect(timeMs(s)).toBe(Date.parse(s));
      }),
      { numRuns: 1000 },
    );
  });
});
