import { linearRegression, linearRegressionLine, rSquared } from "simple-statistics";
import { describe, expect, it } from "vitest";
import {
  bestEffort,
  checkRampRate,
  criticalPower,
  detectRampTest,
  edwardsZoneMinutes,
  pacingAdvice,
  pacingSplits,
  parseActivity,
  plausibilityGuard,
  requirePlausibleThreshold,
  trimpEdwards,
  trimpEdwardsFromHeartRate,
  TrainingInputError,
  type GuardInput,
} from "~/lib/training";
import { computeThreshold } from "~/lib/field-tests";

/**
 * Synthetic ride files, written as CSV and read back through the same parser as an upload: segments of
 * [seconds, watts] with a deterministic ±4 W wobble (so no step is perfectly flat).
 */
function file(segments: [number, number][]) {
  const rows = ["time,power,heart_rate"];
  let t = 0;
  for (const [n, w] of segments)
    for (let i = 0; i < n; i++, t++) rows.push(`${t},${w + ((t * 7) % 9) - 4},${Math.round(100 + w / 4)}`);
  return parseActivity(rows.join("\n"), "synthetic.csv").samples;
}
const ramp = (from: number, to: number, step: number, stepS = 60): [number, number][] => {
  const out: [number, number][] = [];
  for (let w = from; w <= to; w += step) out.push([stepS, w]);
  return out;
};

describe("ramp detection on synthetic files", () => {
  it("slow ramp: 5 W every minute from 125 to 250 W is read as 60 s steps of 5 W, a rate of 5 W/min", () => {
    const r = detectRampTest(file([[600, 100], ...ramp(125, 250, 5), [300, 80]]));
    expect(r).toMatchObject({ stepS: 60, steps: 26, startS: 600, failedIntoStepS: 0 });
    expect(r.stepW).toBeCloseTo(5, 1);
    expect(r.rateWPerMin).toBeCloseTo(5, 1);
    expect(r.firstStepW).toBeCloseTo(125, 0);
    expect(r.lastCompletedStepW).toBeCloseTo(250, 0);
  });

  it("mid-step failure: stopping 30 s into the 380 W step gives 60 s steps of 20 W, last completed step 360 W", () => {
    const r = detectRampTest(file([[600, 110], ...ramp(100, 360, 20), [30, 380], [300, 80]]));
    expect(r).toMatchObject({
      stepS: 60,
      steps: 14,
      failedIntoStepS: 30,
      startS: 600,
      lastCompletedEndS: 600 + 14 * 60,
      endS: 600 + 14 * 60 + 30,
    });
    expect(r.stepW).toBeCloseTo(20, 1);
    expect(r.lastCompletedStepW).toBeCloseTo(360, 0);
    // The best minute straddles the last full step and the failed one: (30 × 360 + 30 × 380) / 60 = 370 W.
    expect(r.bestOneMinuteW).toBeCloseTo(370, 0);
  });

  it("warm-up: a flat warm-up just below the first step is not counted as a step", () => {
    // Warm-up at 90 W, first step 100 W: the 10 W rise is half a step, so the warm-up is not part of the ramp.
    const low = detectRampTest(file([[600, 90], ...ramp(100, 380, 20), [300, 80]]));
    expect(low).toMatchObject({ startS: 600, steps: 15, stepS: 60 });
    expect(low.firstStepW).toBeCloseTo(100, 0);
    // Warm-up at 80 W, exactly one step below: its last minute looks like a step but sits at the warm-up's level.
    const exact = detectRampTest(file([[600, 80], ...ramp(100, 380, 20), [300, 80]]));
    expect(exact).toMatchObject({ startS: 600, steps: 15 });
  });

  it("a usual 20 W/min ramp in 30 s steps of 10 W and a 25 W/min ramp are read at their own step length", () => {
    const half = detectRampTest(file([[600, 100], ...ramp(100, 400, 10, 30), [300, 80]]));
    expect(half).toMatchObject({ stepS: 30 });
    expect(half.rateWPerMin).toBeCloseTo(20, 1);
    const quick = detectRampTest(file([[600, 100], ...ramp(100, 425, 25), [300, 80]]));
    expect(quick.rateWPerMin).toBeCloseTo(25, 1);
  });

  it("a steady ride is not a ramp", () => {
    expect(() => detectRampTest(file([[1800, 200]]))).toThrow(/No ramp/);
  });
});

describe("ramp rate and the 75 % rule (common practice: the rule is used with 20–25 W/min ramps)", () => {
  it("holds within 20–25 W/min and says so outside, asking for a confirming test", () => {
    expect(checkRampRate(20)).toMatchObject({ withinUsual: true, caution: null });
    expect(checkRampRate(25)).toMatchObject({ withinUsual: true, caution: null });
    expect(checkRampRate(5).withinUsual).toBe(false);
    expect(checkRampRate(5).caution).toMatch(
      /rose 5 W a minute.*20–25 W.*lower.*confirm it with a 20-minute or 8-minute test/,
    );
    expect(checkRampRate(30).caution).toMatch(/faster ramp the best minute comes out higher/);
    const slow = computeThreshold("ramp", { bestOneMinuteW: 250, rampRateWPerMin: 5 });
    expect(slow.value).toBeCloseTo(187.5, 9); // 0.75 × 250 W (common practice), kept but cautioned
    expect(slow.cautions).toHaveLength(1);
    expect(computeThreshold("ramp", { bestOneMinuteW: 380, rampRateWPerMin: 20 }).cautions).toEqual([]);
  });
});

describe("progressive laps and pacing advice", () => {
  // A 20-minute test ridden as three rising laps of 6:40 (170, 200, 236 W) between a warm-up and a cool-down.
  const laps = file([
    [900, 150],
    [400, 170],
    [400, 200],
    [400, 236],
    [600, 100],
  ]);
  it("the best 20 minutes are the three laps, paced rising; the proposal (0.95 × 202 W ≈ 192 W) carries advice", () => {
    const best = bestEffort(laps, 1200);
    expect(best.startS).toBe(900);
    const p = pacingSplits(laps, best.startS, 1200);
    expect(p.verdict).toBe("rising");
    // (236 − 170) / 202 ≈ +32.7 % of the window's mean, far beyond ±3 % (common practice for "even").
    expect(p.changePct).toBeCloseTo(((236 - 170) / ((170 + 200 + 236) / 3)) * 100, 0);
    expect(Math.round(computeThreshold("twenty_minute", { meanW: best.mean }).value)).toBe(192);
    expect(pacingAdvice(p.verdict, p.changePct)).toMatch(/33 % stronger.*held back.*below your real threshold/);
  });
  it("fading gets its own advice and even gets none", () => {
    expect(pacingAdvice("fading", -9.6)).toMatch(/10 % weaker.*too hard/);
    expect(pacingAdvice("even", 1)).toBeNull();
  });
});

describe("critical power checks (Monod & Scherrer 1965; Jones et al. 2010, MSSE 42:1876)", () => {
  it("refuses a longer effort with a higher mean power, naming the pair (400 W for 3 min, 420 W for 6 min)", () => {
    const efforts = [
      { durationS: 180, meanPowerW: 400 },
      { durationS: 360, meanPowerW: 420 },
      { durationS: 720, meanPowerW: 300 },
    ];
    expect(() => criticalPower(efforts)).toThrow(/The 6:00 effort \(420 W\) is not below the 3:00 effort \(400 W\)/);
    // The same data would fit with r² ≈ 0.94 (simple-statistics as the independent check): that is why it must not pass quietly.
    const pairs = efforts.map((e) => [e.durationS, e.durationS * e.meanPowerW]);
    expect(rSquared(pairs, linearRegressionLine(linearRegression(pairs)))).toBeCloseTo(0.9398, 3);
  });
  it("warns when r² is below 0.95, and gives the fit points; r² agrees with simple-statistics", () => {
    const efforts = [
      { durationS: 150, meanPowerW: 450 },
      { durationS: 300, meanPowerW: 300 },
      { durationS: 600, meanPowerW: 290 },
      { durationS: 1080, meanPowerW: 200 },
    ];
    const r = criticalPower(efforts);
    const pairs = efforts.map((e) => [e.durationS, e.durationS * e.meanPowerW]);
    const line = linearRegressionLine(linearRegression(pairs));
    expect(r.r2).toBeCloseTo(rSquared(pairs, line), 9);
    expect(r.r2).toBeLessThan(0.95);
    expect(r.warnings.join(" ")).toMatch(/r² 0\.938, below 0\.95/);
    expect(r.points.map((p) => p.durationS)).toEqual([150, 300, 600, 1080]);
    for (const p of r.points) expect(p.fittedWorkJ).toBeCloseTo(line(p.durationS), 6);
  });
  it("warns about efforts outside 2–20 minutes (Jones et al. 2010) on the exact boundaries", () => {
    expect(
      criticalPower([
        { durationS: 120, meanPowerW: 420 },
        { durationS: 1200, meanPowerW: 270 },
      ]).warnings,
    ).toEqual([]);
    expect(
      criticalPower([
        { durationS: 119, meanPowerW: 420 },
        { durationS: 1201, meanPowerW: 270 },
      ]).warnings,
    ).toHaveLength(2);
  });
});

describe("bounds per metric and sport (common practice, from memory)", () => {
  it.each([
    ["bike", "power", 1e300],
    ["bike", "power", 0.0001],
    ["bike", "power", 49],
    ["bike", "heart_rate", 250],
    ["run", "pace", 100],
    ["swim", "pace", 400],
  ] as const)("%s %s %s is refused", (sport, metric, value) => {
    expect(() => requirePlausibleThreshold(sport, metric, value)).toThrow(TrainingInputError);
  });
  it("accepts the edges and names the range in the metric's units", () => {
    expect(requirePlausibleThreshold("bike", "power", 50)).toBe(50);
    expect(requirePlausibleThreshold("bike", "power", 600)).toBe(600);
    expect(() => requirePlausibleThreshold("run", "pace", 100)).toThrow(/2:40 per km and 12:00 per km/);
    expect(() => requirePlausibleThreshold("bike", "pace", 300)).toThrow(/no pace threshold for bike/);
  });
});

describe("plausibility guard (our rule: ±8 % from the current threshold needs a confirmation)", () => {
  const base: GuardInput = {
    sport: "bike",
    metric: "power",
    proposed: 276,
    current: 276,
    protocolLabel: "20-minute test",
    typed: true,
    daysSinceLastTest: 42,
  };
  it("flags beyond ±8 % and not at it", () => {
    expect(plausibilityGuard({ ...base, proposed: 298 }).flagged).toBe(false); // +8.0 %
    expect(plausibilityGuard({ ...base, proposed: 299 }).flagged).toBe(true); // +8.3 %
    expect(plausibilityGuard({ ...base, proposed: 254 }).flagged).toBe(false); // −8.0 %
    expect(plausibilityGuard({ ...base, proposed: 253 }).flagged).toBe(true);
  });
  it("pace changes count in speed: 4:00 → 3:40 per km is +9.1 %", () => {
    const g = plausibilityGuard({ ...base, sport: "run", metric: "pace", current: 240, proposed: 220 });
    expect(g.changePct).toBeCloseTo(9.1, 1);
    expect(g.flagged).toBe(true);
  });
  it("lists the likely reasons it can see", () => {
    const g = plausibilityGuard({
      ...base,
      proposed: 192,
      typed: false,
      daysSinceLastTest: 9,
      previousProtocolLabel: "Ramp test",
      pacing: { verdict: "rising", changePct: 32.7 },
      gaps: { gapS: 60, windowS: 1200 },
      heartRate: { meanHr: 140, thresholdHr: 170 },
    });
    const text = g.reasons.join("\n");
    expect(g.headline).toMatch(/−30\.4 %/);
    for (const word of [
      /^Pacing:/m,
      /^Protocol: the current threshold came from a ramp test/m,
      /^Timing: only 9 days/m,
      /^File: 60 s/m,
      /^Heart rate: it averaged 140 bpm/m,
      /^Equipment:/m,
    ]) {
      expect(text).toMatch(word);
    }
  });
  it("a first test is checked against the profile: 1.5–5.5 W/kg, 80–97 % of maximum heart rate (common practice, from memory)", () => {
    const first = { ...base, current: null };
    expect(plausibilityGuard({ ...first, proposed: 450, profile: { weightKg: 60 } })).toMatchObject({
      flagged: true,
      expectation: { low: 90, high: 330 },
    });
    expect(plausibilityGuard({ ...first, proposed: 240, profile: { weightKg: 60 } }).flagged).toBe(false);
    expect(plausibilityGuard({ ...first, metric: "heart_rate", proposed: 199, profile: { maxHr: 190 } }).flagged).toBe(
      true,
    );
    expect(plausibilityGuard({ ...first, proposed: 450 }).flagged).toBe(false); // no profile, no expectation
  });
  it("a protocol caution alone needs a confirmation", () => {
    expect(plausibilityGuard({ ...base, cautions: ["slow ramp"] })).toMatchObject({
      flagged: true,
      reasons: ["slow ramp"],
    });
  });
});

describe("Edwards zone TRIMP from heart rate (Edwards 1993: 50–60 … 90–100 % HRmax weighted 1–5; below 50 % not counted)", () => {
  const minutes = (bpm: number, max = 200) => edwardsZoneMinutes(new Array(60).fill(bpm), max);
  it("below 50 % counts nothing; exactly 50 % counts in the first zone", () => {
    expect(minutes(99.9)).toEqual([0, 0, 0, 0, 0]);
    expect(trimpEdwardsFromHeartRate(new Array(600).fill(80), 200)).toBe(0); // 10 min at 40 % HRmax
    expect(minutes(100)).toEqual([1, 0, 0, 0, 0]);
  });
  it("each zone is half-open at its lower edge: 60 % of 190 bpm (114 bpm) is zone 2, 113.9 bpm zone 1", () => {
    expect(minutes(114, 190)).toEqual([0, 1, 0, 0, 0]);
    expect(minutes(113.9, 190)).toEqual([1, 0, 0, 0, 0]);
    expect(minutes(180)).toEqual([0, 0, 0, 0, 1]);
    expect(minutes(179.9)).toEqual([0, 0, 0, 1, 0]);
    expect(minutes(205)).toEqual([0, 0, 0, 0, 1]); // above the maximum: top zone
  });
  it("a mixed hour sums as Edwards weights it, skipping gaps", () => {
    // 10 min at 45 %, 10 at 55 %, 10 at 65 %, 10 at 75 %, 10 at 85 %, 10 at 95 % of 200 bpm, plus a minute of gaps.
    const hr = [90, 110, 130, 150, 170, 190].flatMap((b) => new Array(600).fill(b)).concat(new Array(60).fill(null));
    expect(trimpEdwardsFromHeartRate(hr, 200)).toBeCloseTo(10 * (1 + 2 + 3 + 4 + 5), 9);
    expect(trimpEdwards(edwardsZoneMinutes(hr, 200))).toBeCloseTo(150, 9);
  });
});
