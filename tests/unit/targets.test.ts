import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { formatTarget, percentOfThreshold, resolveTarget, TrainingInputError } from "~/lib/training";

describe("targets: absolute = pct × threshold / 100; for pace the percentage is of speed", () => {
  it("power and heart rate round to 1", () => {
    expect(resolveTarget({ metric: "power", lowPct: 95, highPct: 99 }, 250)).toEqual({
      low: 238,
      high: 248,
      unit: "W",
    });
    expect(resolveTarget({ metric: "heart_rate", lowPct: 90 }, 171)).toEqual({ low: 154, high: 154, unit: "bpm" });
  });
  it("110 % of threshold pace 4:00/km is 240 / 1.1 = 218 s (3:38/km)", () => {
    expect(resolveTarget({ metric: "pace", lowPct: 110 }, 240)).toEqual({ low: 218, high: 218, unit: "s/km" });
    const range = resolveTarget({ metric: "pace", lowPct: 90, highPct: 95 }, 240);
    expect(range).toEqual({ low: 267, high: 253, unit: "s/km" });
    expect(formatTarget(range)).toBe("4:13–4:27 /km");
    expect(formatTarget(resolveTarget({ metric: "pace", lowPct: 100 }, 95, { paceUnit: "s/100m" }))).toBe(
      "1:35 /100 m",
    );
  });
  it("resolving then inverting returns the percentage (property, within rounding)", () => {
    fc.assert(
      fc.property(
        fc.constantFrom("power" as const, "heart_rate" as const, "pace" as const),
        fc.double({ min: 30, max: 200, noNaN: true }),
        fc.double({ min: 100, max: 500, noNaN: true }),
        (metric, pct, threshold) => {
          const t = resolveTarget({ metric, lowPct: pct }, threshold);
          const back = percentOfThreshold(metric, t.low, threshold);
          // Rounding to 1 unit moves the percentage by at most half a unit's share of the value.
          const tolerance = metric === "pace" ? (0.5 / (t.low - 0.5)) * pct + 1e-9 : (0.5 / threshold) * 100 + 1e-9;
          expect(Math.abs(back - pct)).toBeLessThanOrEqual(tolerance);
        },
      ),
    );
  });
  it("refuses impossible targets", () => {
    expect(() => resolveTarget({ metric: "power", lowPct: 0 }, 250)).toThrow(TrainingInputError);
    expect(() => resolveTarget({ metric: "power", lowPct: 301 }, 250)).toThrow(TrainingInputError);
    expect(() => resolveTarget({ metric: "power", lowPct: 100, highPct: 90 }, 250)).toThrow(TrainingInputError);
    expect(() => resolveTarget({ metric: "power", lowPct: 100 }, 0)).toThrow(TrainingInputError);
  });
});
