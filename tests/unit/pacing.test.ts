import { describe, expect, it } from "vitest";
import {
  comparePacing,
  flatSpeed,
  pacingPlan,
  ROAD_MODEL,
  thresholdFromEightMinute,
  thresholdFromTwentyMinute,
  TrainingInputError,
  validateSplit,
} from "~/lib/training";

describe("pacing plan arithmetic", () => {
  it("20-minute test: threshold ÷ 0.95, three 400 s segments at 97/100/103 % (common practice), watts rounded to 1", () => {
    const plan = pacingPlan({ protocol: "twenty_minute", thresholdW: 262 });
    // 262 / 0.95 = 275.789… → 276 W expected; 97 % = 267.5 → 268, 100 % → 276, 103 % = 284.06 → 284.
    expect(plan.expectedW).toBe(276);
    expect(plan.segments.map((s) => [s.startS, s.durationS, s.targetW])).toEqual([
      [0, 400, 268],
      [400, 400, 276],
      [800, 400, 284],
    ]);
    // The inverse really is the inverse of the engine's threshold rule.
    expect(thresholdFromTwentyMinute(262 / 0.95)).toBeCloseTo(262, 9);
    expect(plan.segments.map((s) => s.effortScore)).toEqual([7, 8, 10]);
  });

  it("8-minute test: threshold ÷ 0.90 (Klika et al. 2007), 160 s segments", () => {
    const plan = pacingPlan({ protocol: "eight_minute", thresholdW: 250 });
    // 250 / 0.9 = 277.78 → 278; 97 % = 269.44 → 269; 103 % = 286.11 → 286.
    expect(plan.expectedW).toBe(278);
    expect(plan.segments.map((s) => s.targetW)).toEqual([269, 278, 286]);
    expect(plan.segments.map((s) => s.durationS)).toEqual([160, 160, 160]);
    expect(thresholdFromEightMinute(250 / 0.9)).toBeCloseTo(250, 9);
  });

  it("a coach's split of four parts uses whole-second boundaries that add up to the window", () => {
    const plan = pacingPlan({ protocol: "eight_minute", thresholdW: 250, split: [96, 99, 101, 104] });
    expect(plan.segments.map((s) => s.durationS)).toEqual([120, 120, 120, 120]);
    const odd = pacingPlan({ protocol: "twenty_minute", thresholdW: 250, split: [98, 102] });
    expect(odd.segments.reduce((a, s) => a + s.durationS, 0)).toBe(1200);
  });

  it("refuses splits that no longer aim at the expected power, by reason", () => {
    expect(validateSplit([97, 100, 103])).toBeNull();
    expect(validateSplit([110, 110, 110])).toMatch(/average 110 %/);
    expect(validateSplit([80, 100, 120])).toMatch(/between 85 and 115/);
    expect(validateSplit([100])).toMatch(/2 to 4/);
    expect(() => pacingPlan({ protocol: "twenty_minute", thresholdW: 250, split: [120, 120, 120] })).toThrow(
      TrainingInputError,
    );
  });

  it("ramp: the expected best minute is threshold ÷ 0.75, reached on the +20 W/min ramp from 100 W", () => {
    const plan = pacingPlan({ protocol: "ramp", thresholdW: 262 });
    // 262 / 0.75 = 349.33 → 349 W; steps 100, 120, … 360: ceil((349.33 − 100)/20) + 1 = 14 steps, 14 minutes.
    expect(plan.expectedW).toBe(349);
    expect(plan.ramp).toMatchObject({ expectedLastStepW: 360, expectedDurationS: 840 });
    expect(plan.segments.at(-1)!.targetW).toBe(360);
  });

  it("flat-road speed solves the power equation (checked with Cardano's formula for the depressed cubic)", () => {
    const { cdA, crr, rho, eta, g } = ROAD_MODEL;
    for (const [p, m] of [
      [150, 70],
      [276, 84],
      [400, 95],
    ]) {
      // a·v³ + b·v − P·η = 0 → v³ + pv + q = 0 with p = b/a, q = −Pη/a; one real root.
      const a = 0.5 * rho * cdA;
      const b = m * g * crr;
      const pp = b / a;
      const q = (-p * eta) / a;
      const disc = Math.sqrt((q * q) / 4 + (pp * pp * pp) / 27);
      const v = Math.cbrt(-q / 2 + disc) + Math.cbrt(-q / 2 - disc);
      expect(flatSpeed(p, m)).toBeCloseTo(v, 2);
    }
  });

  it("per-lap targets and expected lap times for a loop course (length), and for a given lap time", () => {
    const plan = pacingPlan({ protocol: "twenty_minute", thresholdW: 262, lap: { lengthM: 4000 } });
    const laps = plan.laps!;
    const v = flatSpeed(275.789, 84);
    expect(laps.lapTimeS).toBe(Math.round(4000 / v));
    // Laps follow the segment their start falls in, and the last lap is partial so the laps fill 20 minutes.
    expect(laps.laps[0].targetW).toBe(268);
    expect(laps.laps.at(-1)!.targetW).toBe(284);
    expect(laps.laps.reduce((a, l) => a + l.expectedS, 0)).toBeGreaterThanOrEqual(1198);
    expect(laps.laps.reduce((a, l) => a + l.expectedS, 0)).toBeLessThanOrEqual(1202);
    expect(laps.laps.at(-1)!.fraction).toBeLessThanOrEqual(1);
    const timed = pacingPlan({ protocol: "twenty_minute", thresholdW: 262, lap: { lapTimeS: 300 } });
    expect(timed.laps!.lapTimeS).toBe(300);
    // A lap at 97 % of the expected power is slower than 300 s, one at 103 % faster.
    expect(timed.laps!.laps[0].expectedS).toBeGreaterThan(300);
    expect(timed.laps!.laps.find((l) => l.targetW === 284 && l.fraction === 1)?.expectedS ?? 0).toBeLessThan(300);
    expect(() => pacingPlan({ protocol: "twenty_minute", thresholdW: 262, lap: { lapTimeS: 10 } })).toThrow(
      /too short/,
    );
  });
});

describe("ridden against planned", () => {
  const plan = pacingPlan({ protocol: "twenty_minute", thresholdW: 262 });

  it("the plan's own shape ridden is 'to plan'", () => {
    const c = comparePacing(plan, [268, 276, 284]);
    expect(c.verdict).toBe("to_plan");
    expect(c.segments.map((s) => s.diffPct)).toEqual([0, 0, 0]);
    expect(c.message).toMatch(/proposed threshold of 262 W/);
  });

  it("a much stronger finish is 'held back'; a fade is 'started too hard'; diff in % of planned to 0.1", () => {
    const held = comparePacing(plan, [240, 270, 310]);
    expect(held.verdict).toBe("held_back");
    // (240 − 268) / 268 = −10.45 % → −10.4
    expect(held.segments[0].diffPct).toBe(-10.4);
    const hard = comparePacing(plan, [300, 276, 250]);
    expect(hard.verdict).toBe("started_hard");
    expect(hard.message).toMatch(/faded/);
  });
});
