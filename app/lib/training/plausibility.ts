import { TrainingInputError } from "./errors";
import type { PacingVerdict } from "./analysis";

export type ThresholdSport = "bike" | "run" | "swim";
export type ThresholdMetric = "power" | "heart_rate" | "pace";

/**
 * The widest thresholds Pacewright accepts per sport and metric, typed or computed. They are generous on purpose:
 * they stop typing slips (1e300 W, 0.0001 W, 25 bpm), not unusual athletes. Values are common practice, from
 * memory of what the trade sees: cycling threshold power from about 60 W (untrained, light) to about 500 W
 * (the strongest professionals); threshold heart rate 100–210 bpm; run threshold pace 2:40–12:00 per km;
 * critical swim pace 0:55–4:00 per 100 m.
 */
export const THRESHOLD_BOUNDS: Record<
  string,
  { min: number; max: number; unit: string; label: string; show: (v: number) => string }
> = {
  "bike:power": { min: 50, max: 600, unit: "W", label: "A cycling power threshold", show: (v) => `${v} W` },
  "bike:heart_rate": { min: 100, max: 210, unit: "bpm", label: "A threshold heart rate", show: (v) => `${v} bpm` },
  "run:heart_rate": { min: 100, max: 210, unit: "bpm", label: "A threshold heart rate", show: (v) => `${v} bpm` },
  "run:pace": {
    min: 160,
    max: 720,
    unit: "s/km",
    label: "A running threshold pace",
    show: (v) => `${clock(v)} per km`,
  },
  "swim:pace": {
    min: 55,
    max: 240,
    unit: "s/100m",
    label: "A swimming threshold pace",
    show: (v) => `${clock(v)} per 100 m`,
  },
};

const clock = (s: number) => `${Math.floor(s / 60)}:${String(Math.round(s % 60)).padStart(2, "0")}`;

/** Refuses a threshold outside THRESHOLD_BOUNDS with a message that names the range in the metric's own units. */
export function requirePlausibleThreshold(sport: ThresholdSport, metric: ThresholdMetric, value: number): number {
  const b = THRESHOLD_BOUNDS[`${sport}:${metric}`];
  if (!b)
    throw new TrainingInputError("inconsistent", `There is no ${metric.replace("_", " ")} threshold for ${sport}.`);
  if (typeof value !== "number" || !Number.isFinite(value))
    throw new TrainingInputError("not_a_number", "Enter the threshold as a number.");
  if (value < b.min || value > b.max) {
    throw new TrainingInputError(
      "out_of_range",
      `${b.label} lies between ${b.show(b.min)} and ${b.show(b.max)}; ${metric === "pace" ? `${clock(Math.max(0, value))}` : `${+value.toPrecision(4)} ${b.unit}`} is outside that. Check the number.`,
    );
  }
  return value;
}

/**
 * A change larger than this, either way, needs a person to confirm it before targets move (our product rule:
 * real retest-to-retest changes of a trained athlete are mostly within a few per cent over 4–8 weeks).
 */
export const PLAUSIBLE_CHANGE_PCT = 8;

/**
 * What a profile suggests for a first test (common practice, from memory): power 1.5–5.5 W per kg of body mass
 * (recreational to elite riders); threshold heart rate 80–97 % of the athlete's maximum.
 */
export const FIRST_TEST_EXPECTATION = { wPerKg: { low: 1.5, high: 5.5 }, pctOfMaxHr: { low: 80, high: 97 } } as const;

/** Days between tests that make a large change implausible as real fitness (too soon) or likely real (long gap). */
const SOON_DAYS = 21;
const LONG_DAYS = 84;

export interface GuardInput {
  sport: ThresholdSport;
  metric: ThresholdMetric;
  proposed: number;
  current: number | null;
  protocolLabel: string;
  /** The protocol key of the test that set the current threshold, and its label, when known. */
  previousProtocolLabel?: string | null;
  typed: boolean;
  daysSinceLastTest: number | null;
  /** Reasons the protocol itself gives (ramp rate outside the usual range, a loose CP fit…): each forces a confirmation. */
  cautions?: string[];
  pacing?: { verdict: PacingVerdict; changePct: number } | null;
  /** Seconds inside the test window that were interpolated or stopped, and the window's length. */
  gaps?: { gapS: number; windowS: number } | null;
  /** Mean heart rate in the test window against the athlete's threshold heart rate, when both are known. */
  heartRate?: { meanHr: number; thresholdHr: number } | null;
  profile?: { weightKg?: number | null; maxHr?: number | null };
}

export interface GuardResult {
  flagged: boolean;
  /** Change against the current threshold in % (for pace: of speed, so a faster pace is positive); null on a first test. */
  changePct: number | null;
  headline: string | null;
  reasons: string[];
  expectation: { low: number; high: number; basis: string } | null;
}

const pct = (x: number) => `${x > 0 ? "+" : x < 0 ? "−" : ""}${Math.abs(x).toFixed(1)} %`;

/**
 * The plausibility guard run on every preview and save. It flags a change beyond ±PLAUSIBLE_CHANGE_PCT, a first
 * test outside what the profile suggests, and any protocol caution, and gives the likely reasons it can see.
 */
export function plausibilityGuard(g: GuardInput): GuardResult {
  // Kept to a tenth of a per cent, as shown, so 270 W against 250 W (+8.0 %) is not flagged by float noise.
  const changePct =
    g.current && g.current > 0
      ? Math.round(
          (g.metric === "pace" ? (g.current / g.proposed - 1) * 100 : (g.proposed / g.current - 1) * 100) * 10,
        ) / 10
      : null;
  const expectation = g.current ? null : expectationFor(g);
  const big = changePct !== null && Math.abs(changePct) > PLAUSIBLE_CHANGE_PCT;
  const outside = expectation !== null && (g.proposed < expectation.low || g.proposed > expectation.high);
  const cautions = g.cautions ?? [];
  const flagged = big || outside || cautions.length > 0;
  if (!flagged) return { flagged, changePct, headline: null, reasons: [], expectation };

  let headline: string;
  if (big) {
    headline = `This test would ${changePct! > 0 ? "raise" : "lower"} the threshold by ${pct(changePct!)}${g.metric === "pace" ? " in speed" : ""}, more than the ±${PLAUSIBLE_CHANGE_PCT} % a retest usually moves it.`;
  } else if (outside) {
    headline = `For a first test this is far from what the profile suggests (${expectation!.basis}).`;
  } else {
    headline = "The test itself gives a reason to check this result before it moves any target.";
  }
  const reasons = [...cautions];
  if (g.pacing?.verdict === "rising")
    reasons.push(
      `Pacing: the last third was ${Math.abs(Math.round(g.pacing.changePct))} % stronger than the first, so the effort was probably held back early and the result reads low.`,
    );
  if (g.pacing?.verdict === "fading")
    reasons.push(
      `Pacing: the last third was ${Math.abs(Math.round(g.pacing.changePct))} % weaker than the first; an over-fast start usually lowers the result.`,
    );
  if (g.previousProtocolLabel && g.previousProtocolLabel !== g.protocolLabel) {
    reasons.push(
      `Protocol: the current threshold came from a ${g.previousProtocolLabel.toLowerCase()}, this one from a ${g.protocolLabel.toLowerCase()}; different tests of the same rider often disagree by several per cent.`,
    );
  } else if (g.typed && big) {
    reasons.push(
      "Protocol: the result was typed; a slip of one digit, or a number from another device or test, is a common cause of a jump.",
    );
  }
  if (g.daysSinceLastTest !== null && big) {
    if (g.daysSinceLastTest < SOON_DAYS)
      reasons.push(
        `Timing: only ${g.daysSinceLastTest} days since the last test; fitness rarely moves this far that quickly, so conditions (fatigue, heat, illness, equipment) are the likelier cause.`,
      );
    else if (g.daysSinceLastTest > LONG_DAYS)
      reasons.push(
        `Timing: ${g.daysSinceLastTest} days since the last test; part of this change may be real after a long gap, a break or a training block.`,
      );
  }
  if (g.gaps && g.gaps.windowS > 0 && g.gaps.gapS / g.gaps.windowS > 0.02) {
    reasons.push(
      `File: ${g.gaps.gapS} s of the ${Math.round(g.gaps.windowS / 60)}-minute test window were missing or stopped; dropouts pull the mean power down.`,
    );
  }
  if (g.heartRate && g.heartRate.thresholdHr > 0) {
    const ratio = (g.heartRate.meanHr / g.heartRate.thresholdHr) * 100;
    if (ratio < 93)
      reasons.push(
        `Heart rate: it averaged ${Math.round(g.heartRate.meanHr)} bpm in the test window, ${Math.round(ratio)} % of the threshold heart rate; an all-out effort of this length usually sits near or above it, so the effort may not have been maximal.`,
      );
    else if (ratio > 108 && changePct !== null && changePct < 0)
      reasons.push(
        `Heart rate: it averaged ${Math.round(g.heartRate.meanHr)} bpm, well above the threshold heart rate, while the power fell: fatigue, heat or illness are likely.`,
      );
  }
  if (g.metric === "power" && big)
    reasons.push(
      "Equipment: a different power meter or trainer, or one not zeroed before the test, can read several per cent apart.",
    );
  if (outside && expectation)
    reasons.push(`Profile: ${expectation.basis}; this result is outside it. Check the number and the profile.`);
  return { flagged, changePct, headline, reasons, expectation };
}

function expectationFor(g: GuardInput): GuardResult["expectation"] {
  const p = g.profile ?? {};
  if (g.metric === "power" && p.weightKg && p.weightKg > 0) {
    const { low, high } = FIRST_TEST_EXPECTATION.wPerKg;
    return {
      low: Math.round(low * p.weightKg),
      high: Math.round(high * p.weightKg),
      basis: `${low}–${high} W per kg at ${p.weightKg} kg is ${Math.round(low * p.weightKg)}–${Math.round(high * p.weightKg)} W`,
    };
  }
  if (g.metric === "heart_rate" && p.maxHr && p.maxHr > 0) {
    const { low, high } = FIRST_TEST_EXPECTATION.pctOfMaxHr;
    return {
      low: Math.round((low * p.maxHr) / 100),
      high: Math.round((high * p.maxHr) / 100),
      basis: `${low}–${high} % of a ${p.maxHr} bpm maximum is ${Math.round((low * p.maxHr) / 100)}–${Math.round((high * p.maxHr) / 100)} bpm`,
    };
  }
  return null;
}
