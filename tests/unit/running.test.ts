import { describe, expect, it } from "vitest";
import { raceTimeForIndex, runningIndex, thresholdPaceForIndex, TrainingInputError } from "~/lib/training";

/*
 * Checks against Daniels & Gilbert (1979) and the tables of Daniels' Running Formula. The worked example
 * (10 km in 40:00 → 51.9) follows from the published equations. The table entries below (5 km race times and
 * threshold paces for indexes 40, 50 and 60) are quoted from memory of the book's tables, not from a copy at hand.
 */
describe("running index (Daniels & Gilbert 1979)", () => {
  it("10 km in 40:00 → 51.94", () => {
    // By hand: v = 250 m/min; cost = −4.60 + 45.5645 + 6.5 = 47.4645; fraction at 40 min = 0.913766.
    expect(runningIndex(10_000, 2400)).toBeCloseTo(51.94, 2);
  });

  it.each([
    [40, 24 * 60 + 8],
    [50, 19 * 60 + 57],
    [60, 17 * 60 + 3],
  ])("index %i matches the table's 5 km time within 0.1", (index, tableS) => {
    expect(Math.abs(runningIndex(5000, tableS) - index)).toBeLessThan(0.1);
    // The prediction by bisection lands within a few seconds of the table (the table rounds to the second).
    expect(Math.abs(raceTimeForIndex(index, 5000) - tableS)).toBeLessThan(8);
  });

  it("prediction inverts the index exactly", () => {
    for (const d of [1500, 5000, 10_000, 21_097.5, 42_195]) {
      const t = raceTimeForIndex(48.3, d);
      expect(runningIndex(d, t)).toBeCloseTo(48.3, 4);
    }
  });

  it.each([
    [40, 5 * 60 + 6],
    [50, 4 * 60 + 15],
    [60, 3 * 60 + 40],
  ])("threshold pace for index %i is the table's %i s per km (±2 s)", (index, tableS) => {
    expect(Math.abs(thresholdPaceForIndex(index) - tableS)).toBeLessThanOrEqual(2);
  });

  it("refuses impossible races", () => {
    expect(() => runningIndex(100, 10)).toThrow(TrainingInputError);
    expect(() => runningIndex(5000, 60)).toThrow(/outside/);
    expect(() => runningIndex(5000, NaN)).toThrow(TrainingInputError);
    expect(() => raceTimeForIndex(0, 5000)).toThrow(TrainingInputError);
  });
});
