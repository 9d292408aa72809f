import { sampleStandardDeviation, standardDeviation, mean } from "simple-statistics";
import { describe, expect, it } from "vitest";
import {
  acuteChronicRatio,
  usualWeekRange,
  effortLoad,
  fitnessFatigue,
  monotonyStrain,
  ratioBand,
  trimpBanister,
  trimpEdwards,
  TrainingInputError,
} from "~/lib/training";

describe("effort load (session-RPE method, Foster et al. 2001)", () => {
  it("effort 7 for 60 min → 420", () => expect(effortLoad(7, 60)).toBe(420));
  it("refuses a score above 10 or negative minutes", () => {
    expect(() => effortLoad(11, 60)).toThrow(TrainingInputError);
    expect(() => effortLoad(5, -1)).toThrow(TrainingInputError);
  });
});

describe("TRIMP (Banister; constants 0.64·e^1.92x male, 0.86·e^1.67x female)", () => {
  it("45 min at 150 bpm, rest 60, max 190, male → 75.3 ± 0.1", () => {
    // By hand: x = 90/130 = 0.6923; 45 × 0.6923 × 0.64 × e^(1.92 × 0.6923) = 75.33.
    expect(trimpBanister({ minutes: 45, avgHr: 150, restHr: 60, maxHr: 190, sex: "male" })).toBeCloseTo(75.3, 1);
  });
  it("the female constants give 45 × x × 0.86 × e^(1.67x)", () => {
    const x = 90 / 130;
    expect(trimpBanister({ minutes: 45, avgHr: 150, restHr: 60, maxHr: 190, sex: "female" })).toBeCloseTo(
      45 * x * 0.86 * Math.exp(1.67 * x),
      9,
    );
  });
  it("refuses max ≤ rest", () =>
    expect(() => trimpBanister({ minutes: 30, avgHr: 120, restHr: 60, maxHr: 60 + 0, sex: "male" })).toThrow(
      TrainingInputError,
    ));
});

describe("Edwards zone TRIMP (Edwards 1993): minutes × zone weight 1–5", () => {
  it("10, 20, 15, 5, 2 minutes → 10 + 40 + 45 + 20 + 10 = 125", () =>
    expect(trimpEdwards([10, 20, 15, 5, 2])).toBe(125));
  it("needs five zones", () => expect(() => trimpEdwards([1, 2, 3])).toThrow(TrainingInputError));
});

describe("monotony and strain (Foster 1998)", () => {
  const week = [300, 0, 450, 200, 0, 600, 350];
  it("monotony = mean / population SD, strain = weekly load × monotony (checked with simple-statistics)", () => {
    const r = monotonyStrain(week);
    expect(r.weeklyLoad).toBe(1900);
    expect(r.monotony).toBeCloseTo(mean(week) / standardDeviation(week), 12);
    expect(r.strain).toBeCloseTo(1900 * (mean(week) / standardDeviation(week)), 9);
  });
  it("the sample-SD variant divides by n − 1", () => {
    expect(monotonyStrain(week, { sd: "sample" }).monotony).toBeCloseTo(mean(week) / sampleStandardDeviation(week), 12);
  });
  it("identical days have no monotony value rather than Infinity", () => {
    const r = monotonyStrain([100, 100, 100, 100, 100, 100, 100]);
    expect(r.monotony).toBeNull();
    expect(r.strain).toBeNull();
  });
});

describe("fitness and fatigue (Banister et al. 1975 impulse–response, EWMA form)", () => {
  it("a constant load L from zero follows the closed form L(1 − e^(−n/τ))", () => {
    const days = fitnessFatigue(new Array(100).fill(80));
    for (const n of [1, 7, 42, 100]) {
      expect(days[n - 1].fitness).toBeCloseTo(80 * (1 - Math.exp(-n / 42)), 9);
      expect(days[n - 1].fatigue).toBeCloseTo(80 * (1 - Math.exp(-n / 7)), 9);
      expect(days[n - 1].balance).toBeCloseTo(days[n - 1].fitness - days[n - 1].fatigue, 12);
    }
  });
  it("one load then rest decays by e^(−1/τ) a day", () => {
    const days = fitnessFatigue([100, 0, 0]);
    expect(days[0].fatigue).toBeCloseTo(100 * (1 - Math.exp(-1 / 7)), 12);
    expect(days[2].fatigue / days[1].fatigue).toBeCloseTo(Math.exp(-1 / 7), 12);
  });
  it("refuses a negative load", () => expect(() => fitnessFatigue([10, -1])).toThrow(TrainingInputError));
});

describe("acute:chronic ratio", () => {
  it("rolling 7:28 (Gabbett 2016): null before 28 days, then mean7 / mean28", () => {
    const loads = Array.from({ length: 35 }, (_, i) => (i < 28 ? 50 : 100));
    const r = acuteChronicRatio(loads);
    expect(r.slice(0, 27).every((v) => v === null)).toBe(true);
    expect(r[27]).toBeCloseTo(1, 12);
    expect(r[34]).toBeCloseTo(100 / ((21 * 50 + 7 * 100) / 28), 12);
  });
  it("EWMA (Williams et al. 2017): EWMA_t = λ·load_t + (1 − λ)·EWMA_(t−1), λ = 2/(N + 1)", () => {
    const loads = [...new Array(35).fill(50), ...new Array(7).fill(100)];
    const r = acuteChronicRatio(loads, { method: "ewma" });
    // Reference recursion written out here; both averages start from the first 28 days' mean (common practice).
    let a = 50;
    let c = 50;
    const ref = loads.map((l) => {
      a = 0.25 * l + 0.75 * a;
      c = (2 / 29) * l + (27 / 29) * c;
      return a / c;
    });
    expect(r.slice(0, 27).every((v) => v === null)).toBe(true);
    for (let i = 27; i < loads.length; i++) expect(r[i]).toBeCloseTo(ref[i], 12);
    expect(r[41]!).toBeGreaterThan(1.3);
    expect(acuteChronicRatio([0, 0], { method: "ewma" })).toEqual([null, null]);
  });
  it("start-up: with less than 28 days of history there is no ratio, never a spike from empty averages", () => {
    // 84 unknown days, then a first week of training: the old formula reported a ratio far above 1.5 here.
    const loads = [...new Array(84).fill(0), ...new Array(7).fill(100)];
    for (const method of ["rolling", "ewma"] as const) {
      const r = acuteChronicRatio(loads, { method });
      expect(r.every((v) => v === null)).toBe(true);
    }
    const later = [...new Array(84).fill(0), ...new Array(28).fill(100)];
    expect(acuteChronicRatio(later, { method: "ewma" }).at(-1)).toBeCloseTo(1, 12);
    expect(acuteChronicRatio(later).at(-1)).toBeCloseTo(1, 12);
    // An explicit start of history (e.g. the first recorded session) counts rest days after it as real zeros.
    const withRest = [100, ...new Array(27).fill(0)];
    expect(acuteChronicRatio(withRest, { historyStart: 0 }).at(-1)).toBe(0);
  });
  it("usual week range = 28-day mean daily load × 7 × [0.8, 1.3] (Gabbett 2016), none before 28 days of history", () => {
    const loads = new Array(35).fill(60);
    expect(usualWeekRange(loads, 28)).toEqual({ low: 420 * 0.8, high: 420 * 1.3, chronic: 420 });
    expect(usualWeekRange(loads, 27)).toBeNull();
    expect(usualWeekRange([...new Array(10).fill(0), ...new Array(30).fill(60)], 35)).toBeNull();
  });
  it("bands are guidance: <0.8 low, ≤1.3 usual, ≤1.5 raised, above a spike", () => {
    expect([0.5, 1, 1.4, 1.9].map(ratioBand)).toEqual(["low", "usual", "raised", "spike"]);
  });
});
