import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  formatTarget,
  heartRateZones,
  paceZones,
  percentOfThreshold,
  powerLevels,
  resolveTarget,
  zoneOf,
  zoneOfPct,
  TrainingInputError,
} from "~/lib/training";

describe("power levels (common practice: ≤55, 56–75, 76–90, 91–105, 106–120, 121–150, >150 %)", () => {
  const set = powerLevels(250);
  it("boundaries for 250 W are 137.5 / 187.5 / 225 / 262.5 / 300 / 375 W", () => {
    expect(set.zones.map((z) => z.hi)).toEqual([137.5, 187.5, 225, 262.5, 300, 375, null]);
  });
  it("uses half-open intervals (lo, hi]: a value on a boundary belongs to the lower level", () => {
    expect(zoneOf(137.5, set).index).toBe(1);
    expect(zoneOf(137.6, set).index).toBe(2);
    expect(zoneOf(262.5, set).index).toBe(4);
    expect(zoneOf(262.51, set).index).toBe(5);
    expect(zoneOf(375, set).index).toBe(6);
    expect(zoneOf(1200, set).index).toBe(7);
    expect(zoneOf(1, set).index).toBe(1);
  });
});

describe("heart-rate zones (Friel; percentages from memory of the books' tables)", () => {
  it("bike zones for LTHR 170: Z2 81–89 %, Z5a 100–102 %", () => {
    const set = heartRateZones(170, "bike");
    expect(set.zones.map((z) => z.key)).toEqual(["Z1", "Z2", "Z3", "Z4", "Z5a", "Z5b", "Z5c"]);
    expect(zoneOfPct(80, set).key).toBe("Z1");
    expect(zoneOfPct(81, set).key).toBe("Z2");
    expect(zoneOfPct(89, set).key).toBe("Z2");
    expect(zoneOfPct(90, set).key).toBe("Z3");
    expect(zoneOfPct(100, set).key).toBe("Z5a");
    expect(zoneOfPct(107, set).key).toBe("Z5c");
    expect(zoneOf(170, set).key).toBe("Z5a");
  });
  it("run zones start Z2 at 85 %", () => {
    const set = heartRateZones(170, "run");
    expect(zoneOfPct(84, set).key).toBe("Z1");
    expect(zoneOfPct(85, set).key).toBe("Z2");
    expect(zoneOfPct(95, set).key).toBe("Z4");
  });
});

describe("pace zones (percent of threshold speed; common practice)", () => {
  it("a faster pace is a higher zone", () => {
    const set = paceZones(240); // 4:00 per km
    expect(zoneOf(240, set).key).toBe("P4");
    expect(zoneOf(320, set).key).toBe("P1"); // 75 % of threshold speed
    expect(zoneOf(300, set).key).toBe("P2"); // 80 %
    expect(zoneOf(210, set).key).toBe("P6"); // 114 %
    expect(set.zones[0].lo).toBeGreaterThan(set.zones[0].hi!);
  });
});

describe("zones tile the range without gaps or overlaps (property)", () => {
  it.each([
    ["power", (t: number) => powerLevels(t)],
    ["heart rate (bike)", (t: number) => heartRateZones(Math.min(220, Math.max(80, t)), "bike")],
    ["pace", (t: number) => paceZones(Math.min(1100, Math.max(130, t)))],
  ] as const)("%s", (_name, make) => {
    fc.assert(
      fc.property(fc.double({ min: 100, max: 450, noNaN: true }), fc.double({ min: 0.001, max: 300, noNaN: true }), (threshold, pct) => {
        const set = make(threshold);
        set.zones.forEach((z, i) => {
          if (i > 0) expect(z.loPct).toBe(set.zones[i - 1].hiPct);
        });
        expect(set.zones[0].loPct).toBe(0);
        expect(set.zones.at(-1)!.hiPct).toBeNull();
        const matches = set.zones.filter((z) => (z.index === 1 || pct > z.loPct) && (z.hiPct === null || pct <= z.hiPct));
        expect(matches).toHaveLength(1);
        expect(zoneOfPct(pct, set).index).toBe(matches[0].index);
      }),
    );
  });
});

describe("targets: absolute = pct × threshold / 100; for pace the percentage is of speed", () => {
  it("power and heart rate round to 1", () => {
    expect(resolveTarget({ metric: "power", lowPct: 95, highPct: 99 }, 250)).toEqual({ low: 238, high: 248, unit: "W" });
    expect(resolveTarget({ metric: "heart_rate", lowPct: 90 }, 171)).toEqual({ low: 154, high: 154, unit: "bpm" });
  });
  it("110 % of threshold pace 4:00/km is 240 / 1.1 = 218 s (3:38/km)", () => {
    expect(resolveTarget({ metric: "pace", lowPct: 110 }, 240)).toEqual({ low: 218, high: 218, unit: "s/km" });
    const range = resolveTarget({ metric: "pace", lowPct: 90, highPct: 95 }, 240);
    expect(range).toEqual({ low: 267, high: 253, unit: "s/km" });
    expect(formatTarget(range)).toBe("4:13–4:27 /km");
    expect(formatTarget(resolveTarget({ metric: "pace", lowPct: 100 }, 95, { paceUnit: "s/100m" }))).toBe("1:35 /100 m");
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
