/**
 * Over 300 lines because the plan, the road model that turns its powers into speeds, and the comparison with what was
 * ridden share the plan's shape and limits, and the comparison's verdicts only mean something against the plan.
 */
import { requirePositive, TrainingInputError } from "./errors";

/**
 * Pacing plan for a field test: the power the test should produce, split into equal segments of rising effort.
 *
 * Expected test power is the inverse of the factor that turns the test into a threshold (thresholds.ts):
 * 20-minute test: threshold ÷ 0.95 (common practice); 8-minute test: threshold ÷ 0.90 (Klika et al. 2007);
 * ramp: the best minute expected at threshold ÷ 0.75 (common practice).
 * The split into three equal segments at 97 / 100 / 103 % of the expected power is common practice (start firmly
 * with something in reserve, settle, finish with what is left); a coach may change it per test.
 * Rounding: every wattage to 1 W, every time to 1 s (DESIGN §4).
 */
export const PACED_PROTOCOLS = ["twenty_minute", "eight_minute", "ramp"] as const;
export type PacedProtocol = (typeof PACED_PROTOCOLS)[number];

export const isPacedProtocol = (p: string | null | undefined): p is PacedProtocol =>
  (PACED_PROTOCOLS as readonly string[]).includes(p ?? "");

export const TEST_FACTOR: Record<PacedProtocol, number> = { twenty_minute: 0.95, eight_minute: 0.9, ramp: 0.75 };
/** Length of the effort the factor applies to. */
export const TEST_WINDOW_S: Record<PacedProtocol, number> = { twenty_minute: 1200, eight_minute: 480, ramp: 60 };
/** The ramp our test session rides: +20 W every minute from 100 W (lib/protocols.ts). */
export const RAMP_START_W = 100;
export const RAMP_STEP_W = 20;
export const RAMP_STEP_S = 60;

export const DEFAULT_SPLIT_PCT: readonly number[] = [97, 100, 103];
/** A coach's split: 2 to 4 segments, each 85–115 % of expected, averaging 98–102 % (so the test still aims at the expected power). */
export const SPLIT_LIMITS = {
  minSegments: 2,
  maxSegments: 4,
  minPct: 85,
  maxPct: 115,
  minMeanPct: 98,
  maxMeanPct: 102,
} as const;

export function validateSplit(split: readonly number[]): string | null {
  const { minSegments, maxSegments, minPct, maxPct, minMeanPct, maxMeanPct } = SPLIT_LIMITS;
  if (!Array.isArray(split) || split.length < minSegments || split.length > maxSegments)
    return `Give ${minSegments} to ${maxSegments} segments.`;
  if (split.some((p) => typeof p !== "number" || !Number.isFinite(p)))
    return "Each segment needs a number (% of expected power).";
  if (split.some((p) => p < minPct || p > maxPct))
    return `Each segment must lie between ${minPct} and ${maxPct} % of the expected power.`;
  const mean = split.reduce((a, b) => a + b, 0) / split.length;
  if (mean < minMeanPct || mean > maxMeanPct) {
    return `The segments average ${Math.round(mean * 10) / 10} %; keep the average between ${minMeanPct} and ${maxMeanPct} % so the test still aims at the expected power.`;
  }
  return null;
}

export interface PacingSegment {
  index: number;
  /** Seconds from the start of the effort. */
  startS: number;
  durationS: number;
  pct: number;
  targetW: number;
  /** Effort score to feel (0–10) and what to do, in our words. */
  effortScore: number;
  cue: string;
}

export interface PacingLap {
  lap: number;
  /** Share of a full lap (the last lap of a timed effort is usually partial). */
  fraction: number;
  startS: number;
  targetW: number;
  expectedS: number;
}

export interface PacingPlan {
  protocol: PacedProtocol;
  thresholdW: number;
  expectedW: number;
  windowS: number;
  segments: PacingSegment[];
  /** Ramp only: the step the rider is expected to reach and when. */
  ramp: { startW: number; stepW: number; stepS: number; expectedLastStepW: number; expectedDurationS: number } | null;
  laps: { lengthM: number | null; lapTimeS: number; laps: PacingLap[] } | null;
}

/** Expected mean power of the test effort for a threshold (unrounded). */
export function expectedTestPower(protocol: PacedProtocol, thresholdW: number): number {
  return requirePositive(thresholdW, "Threshold power (W)", 2500) / TEST_FACTOR[protocol];
}

/** Our words for each part: the first holds back, the middle settles, the last spends what is left. */
function cueFor(k: number, n: number, protocol: PacedProtocol): { effortScore: number; cue: string } {
  if (protocol === "ramp") {
    if (k === 0)
      return {
        effortScore: 4,
        cue: "Spin, relax the shoulders, breathe through the nose if you can; these steps should feel almost too easy.",
      };
    if (k < n - 1)
      return {
        effortScore: 7,
        cue: "Breathing deepens; keep the cadence up and do not stand. Each minute is one step, not a sprint.",
      };
    return {
      effortScore: 10,
      cue: "Now it hurts: count down to the next step and hold each one as long as you can turn the pedals.",
    };
  }
  if (k === 0)
    return {
      effortScore: 7,
      cue: "Firm but held back: you could still say a short sentence. If this feels easy, that is the plan.",
    };
  if (k < n - 1)
    return {
      effortScore: 8,
      cue: "Settle at the expected power; breathing hard and even, words only one or two at a time.",
    };
  return { effortScore: 10, cue: "Give what is left, a little more each minute; you should have nothing at the line." };
}

/** Equal parts of a window with whole-second boundaries (the same boundaries pacingSplits uses). */
function boundaries(windowS: number, parts: number): number[] {
  return Array.from({ length: parts + 1 }, (_, k) => Math.round((k * windowS) / parts));
}

export interface PacingOptions {
  protocol: PacedProtocol;
  thresholdW: number;
  split?: readonly number[];
  /** A loop course: its length in metres, or the lap time ridden at about the expected power. */
  lap?: { lengthM?: number | null; lapTimeS?: number | null } | null;
  /** Rider and bike mass for the flat-road speed model (kg); 84 kg when unknown. */
  systemKg?: number | null;
}

export function pacingPlan(opts: PacingOptions): PacingPlan {
  const { protocol } = opts;
  if (!isPacedProtocol(protocol))
    throw new TrainingInputError("out_of_range", "Pacing plans are made for the 20-minute, 8-minute and ramp tests.");
  const thresholdW = opts.thresholdW;
  const expected = expectedTestPower(protocol, thresholdW);
  const expectedW = Math.round(expected);
  if (protocol === "ramp") {
    // Steps are ridden until the best minute: its power is the last completed step's.
    const steps = Math.max(1, Math.ceil((expected - RAMP_START_W) / RAMP_STEP_W) + 1);
    const expectedDurationS = steps * RAMP_STEP_S;
    const cuts = boundaries(steps, 3).map((b) => b * RAMP_STEP_S);
    const segments = [0, 1, 2].map((k) => {
      const lastStep = Math.max(0, cuts[k + 1] / RAMP_STEP_S - 1);
      const targetW = RAMP_START_W + lastStep * RAMP_STEP_W;
      return {
        index: k,
        startS: cuts[k],
        durationS: cuts[k + 1] - cuts[k],
        pct: Math.round((targetW / expected) * 100),
        targetW,
        ...cueFor(k, 3, protocol),
      };
    });
    return {
      protocol,
      thresholdW,
      expectedW,
      windowS: TEST_WINDOW_S.ramp,
      segments,
      ramp: {
        startW: RAMP_START_W,
        stepW: RAMP_STEP_W,
        stepS: RAMP_STEP_S,
        expectedLastStepW: RAMP_START_W + (steps - 1) * RAMP_STEP_W,
        expectedDurationS,
      },
      laps: null,
    };
  }
  const split = opts.split ?? DEFAULT_SPLIT_PCT;
  const problem = validateSplit(split);
  if (problem) throw new TrainingInputError("out_of_range", problem);
  const windowS = TEST_WINDOW_S[protocol];
  const cuts = boundaries(windowS, split.length);
  const segments: PacingSegment[] = split.map((pct, k) => ({
    index: k,
    startS: cuts[k],
    durationS: cuts[k + 1] - cuts[k],
    pct,
    targetW: Math.round((expected * pct) / 100),
    ...cueFor(k, split.length, protocol),
  }));
  return {
    protocol,
    thresholdW,
    expectedW,
    windowS,
    segments,
    ramp: null,
    laps: opts.lap ? lapPlan(segments, windowS, expected, opts.lap, opts.systemKg ?? null) : null,
  };
}

/**
 * Flat-road, still-air speed for a power (Martin JC et al. 1998, J Appl Biomech 14:276–291, the aerodynamic and
 * rolling terms only): P·η = v·(m·g·Crr + ½·ρ·CdA·v²). Typical values, common practice: CdA 0.32 m² (hoods),
 * Crr 0.005, ρ 1.2 kg/m³, drivetrain efficiency η 0.976. Solved by bisection to 1 mm/s.
 */
export const ROAD_MODEL = { cdA: 0.32, crr: 0.005, rho: 1.2, eta: 0.976, g: 9.81, defaultSystemKg: 84 } as const;

export function flatSpeed(powerW: number, systemKg: number = ROAD_MODEL.defaultSystemKg): number {
  const p = requirePositive(powerW, "Power (W)", 2500);
  const m = requirePositive(systemKg, "Rider and bike mass (kg)", 250);
  const { cdA, crr, rho, eta, g } = ROAD_MODEL;
  const need = (v: number) => v * (m * g * crr + 0.5 * rho * cdA * v * v);
  let lo = 0;
  let hi = 40;
  while (hi - lo > 0.001) {
    const mid = (lo + hi) / 2;
    if (need(mid) < p * eta) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

function lapPlan(
  segments: PacingSegment[],
  windowS: number,
  expected: number,
  lap: NonNullable<PacingOptions["lap"]>,
  systemKg: number | null,
): NonNullable<PacingPlan["laps"]> {
  const kg = systemKg ?? ROAD_MODEL.defaultSystemKg;
  const lengthM = lap.lengthM ? requirePositive(lap.lengthM, "Lap length (m)", 100_000) : null;
  const givenLapS = lap.lapTimeS ? requirePositive(lap.lapTimeS, "Lap time (s)", 3600) : null;
  if (!lengthM && !givenLapS) throw new TrainingInputError("out_of_range", "Give the lap length or the lap time.");
  const vExpected = flatSpeed(expected, kg);
  // A given lap time is the lap at the expected power; the model only scales it to each segment's power.
  const lapAt = (watts: number) =>
    lengthM ? lengthM / flatSpeed(watts, kg) : givenLapS! * (vExpected / flatSpeed(watts, kg));
  if (lapAt(expected) < 20)
    throw new TrainingInputError(
      "out_of_range",
      "A lap under 20 seconds is too short to pace by; use the segments instead.",
    );
  const segmentAt = (t: number) =>
    segments.find((s) => t >= s.startS && t < s.startS + s.durationS) ?? segments[segments.length - 1];
  const laps: PacingLap[] = [];
  let t = 0;
  while (t < windowS - 0.5 && laps.length < 200) {
    const target = segmentAt(t).targetW;
    const full = lapAt(target);
    const fraction = Math.min(1, (windowS - t) / full);
    laps.push({
      lap: laps.length + 1,
      fraction: Math.round(fraction * 100) / 100,
      startS: Math.round(t),
      targetW: target,
      expectedS: Math.round(full * fraction),
    });
    t += full * fraction;
  }
  return { lengthM, lapTimeS: Math.round(lapAt(expected)), laps };
}

export interface RiddenSegment {
  index: number;
  plannedW: number;
  riddenW: number;
  /** ridden − planned, in % of planned. */
  diffPct: number;
}

export type PlanVerdict = "to_plan" | "held_back" | "started_hard";

export interface PlanComparison {
  segments: RiddenSegment[];
  meanW: number;
  verdict: PlanVerdict;
  /** The effort's mean against the expected power, in %. */
  levelPct: number;
  message: string;
}

/** A segment within ±3 % of its target counts as ridden to plan (common practice, the same tolerance as even pacing). */
export const PLAN_TOLERANCE_PCT = 3;

/**
 * Lays the ridden segment means of the effort over the plan. The verdict is about shape: whether the last segment
 * rose over the first by about what the plan asked (within ±3 % of the effort's mean), more (held back early) or
 * less (started too hard). The message says what this means for the threshold the test proposes.
 */
export function comparePacing(plan: PacingPlan, riddenMeans: readonly number[]): PlanComparison {
  if (riddenMeans.length !== plan.segments.length)
    throw new TrainingInputError("out_of_range", "The ridden segments do not match the plan's segments.");
  const segments = plan.segments.map((s, k) => ({
    index: k,
    plannedW: s.targetW,
    riddenW: Math.round(riddenMeans[k]),
    diffPct: Math.round(((riddenMeans[k] - s.targetW) / s.targetW) * 1000) / 10,
  }));
  let sum = 0;
  plan.segments.forEach((s, k) => (sum += riddenMeans[k] * s.durationS));
  const meanW = sum / plan.segments.reduce((a, s) => a + s.durationS, 0);
  const first = plan.segments[0];
  const last = plan.segments[plan.segments.length - 1];
  const plannedRise = ((last.targetW - first.targetW) / plan.expectedW) * 100;
  const riddenRise = meanW > 0 ? ((riddenMeans[riddenMeans.length - 1] - riddenMeans[0]) / meanW) * 100 : 0;
  const off = riddenRise - plannedRise;
  const verdict: PlanVerdict = Math.abs(off) <= PLAN_TOLERANCE_PCT ? "to_plan" : off > 0 ? "held_back" : "started_hard";
  const levelPct = Math.round((meanW / plan.expectedW) * 1000) / 10;
  const level = levelPct >= 100 + PLAN_TOLERANCE_PCT ? "above" : levelPct <= 100 - PLAN_TOLERANCE_PCT ? "below" : "at";
  const proposed = Math.round(meanW * TEST_FACTOR[plan.protocol]);
  const messages: Record<PlanVerdict, string> = {
    to_plan: `You rode the plan's shape. The effort averaged ${Math.round(meanW)} W, ${level === "at" ? "about the expected" : `${level} the expected`} ${plan.expectedW} W, so the proposed threshold of ${proposed} W is a fair reading${level === "above" ? ": you have most likely improved" : level === "below" ? ": a bad day, or fitness has dropped; check sleep and recent load before trusting it" : ""}.`,
    held_back: `You finished much stronger than the plan asked: the opening held more in reserve than needed. The proposed ${proposed} W is most likely below your real threshold; treat it as a floor, and next time open at the first segment's target.`,
    started_hard: `You opened harder than the plan and faded towards the end. A fade usually costs more than the fast start gained, so the proposed ${proposed} W may sit a little below your real threshold; next time hold the first segment to its target.`,
  };
  return { segments, meanW, verdict, levelPct, message: messages[verdict] };
}

export const PLAN_VERDICT_WORDS: Record<PlanVerdict, string> = {
  to_plan: "to plan",
  held_back: "held back early",
  started_hard: "started too hard",
};
