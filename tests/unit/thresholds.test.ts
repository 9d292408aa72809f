import { linearRegression, linearRegressionLine, rSquared } from "simple-statistics";
import { describe, expect, it } from "vitest";
import {
  criticalPower,
  criticalSwimSpeed,
  thresholdFromEightMinute,
  thresholdFromRamp,
  thresholdFromTwentyMinute,
  thresholdHeartRate,
  timeToExhaustion,
  TrainingInputError,
} from "~/lib/training";

describe("threshold power from field tests", () => {
  it("20-minute test × 0.95 (common practice): 250 W → 237.5 W", () => {
    expect(thresholdFromTwentyMinute(250)).toBeCloseTo(237.5, 10);
  });
  it("8-minute test × 0.90 (Klika et al. 2007, J Strength Cond Res 21:265): 300 W → 270 W", () => {
    expect(thresholdFromEightMinute(300)).toBeCloseTo(270, 10);
  });
  it("ramp test: 75 % of the best minute (common practice): 400 W → 300 W", () => {
    expect(thresholdFromRamp(400)).toBeCloseTo(300, 10);
  });
  it.each([NaN, Infinity, -5, 0, 9000])("refuses %s watts with a typed error", (w) => {
    expect(() => thresholdFromTwentyMinute(w)).toThrow(TrainingInputError);
  });
});

describe("critical power (Monod & Scherrer 1965; Jones et al. 2010, MSSE 42:1876)", () => {
  it("two efforts (180 s, 360 W) and (720 s, 278 W) → CP 250.667 W, W′ 19,680 J", () => {
    const r = criticalPower([
      { durationS: 180, meanPowerW: 360 },
      { durationS: 720, meanPowerW: 278 },
    ]);
    // By hand: work 64,800 J and 200,160 J; slope = 135,360 / 540 = 250.667 W; intercept = 64,800 − 250.667·180.
    expect(r.cpW).toBeCloseTo(250.667, 3);
    expect(r.wPrimeJ).toBeCloseTo(19_680, 6);
    expect(r.r2).toBeCloseTo(1, 10);
    expect(r.warnings).toEqual([]);
  });

  it("agrees with simple-statistics' least-squares regression for four efforts", () => {
    const efforts = [
      { durationS: 150, meanPowerW: 402 },
      { durationS: 300, meanPowerW: 331 },
      { durationS: 600, meanPowerW: 297 },
      { durationS: 1080, meanPowerW: 279 },
    ];
    const pairs = efforts.map((e) => [e.durationS, e.durationS * e.meanPowerW]);
    const ref = linearRegression(pairs);
    const r = criticalPower(efforts);
    expect(r.cpW).toBeCloseTo(ref.m, 9);
    expect(r.wPrimeJ).toBeCloseTo(ref.b, 6);
    expect(r.r2).toBeCloseTo(rSquared(pairs, linearRegressionLine(ref)), 9);
  });

  it("warns about efforts outside 2–20 minutes and refuses inconsistent ones", () => {
    expect(
      criticalPower([
        { durationS: 60, meanPowerW: 500 },
        { durationS: 720, meanPowerW: 278 },
      ]).warnings,
    ).toHaveLength(1);
    expect(() => criticalPower([{ durationS: 180, meanPowerW: 360 }])).toThrow(/at least two/);
    expect(() =>
      criticalPower([
        { durationS: 300, meanPowerW: 300 },
        { durationS: 300, meanPowerW: 310 },
      ]),
    ).toThrow(/different durations/);
    // Longer effort with higher mean power: W′ would be negative.
    expect(() =>
      criticalPower([
        { durationS: 180, meanPowerW: 250 },
        { durationS: 720, meanPowerW: 300 },
      ]),
    ).toThrow(TrainingInputError);
  });

  it("time to exhaustion t = W′/(P − CP); none below CP", () => {
    expect(timeToExhaustion(300, { cpW: 250, wPrimeJ: 20_000 })).toBeCloseTo(400, 10);
    expect(timeToExhaustion(250, { cpW: 250, wPrimeJ: 20_000 })).toBeNull();
    expect(() => timeToExhaustion(NaN, { cpW: 250, wPrimeJ: 20_000 })).toThrow(TrainingInputError);
  });
});

describe("threshold heart rate (Friel's 30-minute test: mean of the last 20 minutes)", () => {
  it("averages only the last 20 minutes", () => {
    const hr = [...new Array(600).fill(140), ...new Array(1200).fill(168)];
    expect(thresholdHeartRate(hr)).toBe(168);
    const rising = Array.from({ length: 1800 }, (_, i) => 150 + i / 100); // last 20 min: 156 … 167.99
    expect(thresholdHeartRate(rising)).toBeCloseTo(150 + (600 + 1799) / 2 / 100, 9);
  });
  it("refuses a test under 30 minutes or with heart rate missing", () => {
    expect(() => thresholdHeartRate(new Array(1700).fill(160))).toThrow(/at least 30 minutes/);
    expect(() => thresholdHeartRate([...new Array(1200).fill(160), ...new Array(600).fill(null)])).toThrow(/missing/);
  });
});

describe("critical swim speed (Wakayoshi et al. 1992; Ginn 1993)", () => {
  it("400 m in 6:00 and 200 m in 2:50 → 1.0526 m/s, 1:35.0 per 100 m", () => {
    const r = criticalSwimSpeed(360, 170);
    expect(r.speedMps).toBeCloseTo(200 / 190, 10);
    expect(r.speedMps).toBeCloseTo(1.0526, 4);
    expect(r.pacePer100mS).toBeCloseTo(95.0, 6);
    expect(r.dPrimeM).toBeCloseTo(400 - (200 / 190) * 360, 9);
  });
  it("refuses t400 ≤ t200 and implausible pairs", () => {
    expect(() => criticalSwimSpeed(170, 170)).toThrow(/longer than the 200/);
    expect(() => criticalSwimSpeed(900, 170)).toThrow(TrainingInputError);
  });
});
