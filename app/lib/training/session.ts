import { requireFinite, TrainingInputError } from "./errors";
import { MAX_TARGET_PCT } from "./targets";
import { bandIndexOf, defaultBandSet, type Band, type Metric } from "./bands";

export const BLOCK_KINDS = ["warmup", "steady", "ramp", "repeats", "cooldown", "open"] as const;
export type BlockKind = (typeof BLOCK_KINDS)[number];

export interface TargetSpec {
  metric: Metric;
  lowPct: number;
  highPct?: number | null;
}

export interface SteadyBlock {
  kind: "warmup" | "steady" | "cooldown";
  durationS: number;
  target: TargetSpec;
  cadence?: number | null;
  cue?: string | null;
}
export interface RampBlock {
  kind: "ramp";
  durationS: number;
  metric: Metric;
  fromPct: number;
  toPct: number;
  cadence?: number | null;
  cue?: string | null;
}
export interface RepeatsBlock {
  kind: "repeats";
  count: number;
  work: { durationS: number; target: TargetSpec };
  recovery: { durationS: number; target?: TargetSpec | null };
  cadence?: number | null;
  cue?: string | null;
}
export interface OpenBlock {
  kind: "open";
  durationS: number;
  cue?: string | null;
}
export type Block = SteadyBlock | RampBlock | RepeatsBlock | OpenBlock;

/** One uninterrupted piece of a session after repeats are unrolled; a ramp stays one step from→to. */
export interface Step {
  blockIndex: number;
  kind: BlockKind;
  part: "main" | "work" | "recovery";
  rep: number | null;
  startS: number;
  durationS: number;
  metric: Metric | null;
  lowPct: number | null;
  highPct: number | null;
  ramp: boolean;
}

export const LIMITS = { minDurationS: 1, maxDurationS: 12 * 3600, maxRepeats: 50, maxPct: MAX_TARGET_PCT } as const;

/** Checks blocks against the limits a session can have; returns messages keyed by path (empty when valid). */
export function validateBlocks(blocks: readonly Block[]): Record<string, string> {
  const errors: Record<string, string> = {};
  const duration = (v: unknown, path: string) => {
    if (typeof v !== "number" || !Number.isFinite(v) || v < LIMITS.minDurationS || v > LIMITS.maxDurationS) {
      errors[path] = "Duration must be between 1 second and 12 hours.";
    }
  };
  const pct = (v: unknown, path: string) => {
    if (typeof v !== "number" || !Number.isFinite(v) || v <= 0 || v > LIMITS.maxPct)
      errors[path] = "Use a percentage above 0 and at most 300.";
  };
  const target = (t: TargetSpec | null | undefined, path: string) => {
    if (!t) {
      errors[path] = "Give a target.";
      return;
    }
    pct(t.lowPct, `${path}.lowPct`);
    if (t.highPct != null) {
      pct(t.highPct, `${path}.highPct`);
      if (t.highPct < t.lowPct) errors[`${path}.highPct`] = "The high end must not be below the low end.";
    }
  };
  if (!Array.isArray(blocks) || blocks.length === 0) errors.blocks = "Add at least one block.";
  blocks.forEach((b, i) => {
    const p = `blocks.${i}`;
    switch (b.kind) {
      case "warmup":
      case "steady":
      case "cooldown":
        duration(b.durationS, `${p}.durationS`);
        target(b.target, `${p}.target`);
        break;
      case "ramp":
        duration(b.durationS, `${p}.durationS`);
        pct(b.fromPct, `${p}.fromPct`);
        pct(b.toPct, `${p}.toPct`);
        break;
      case "repeats":
        if (!Number.isInteger(b.count) || b.count < 1 || b.count > LIMITS.maxRepeats)
          errors[`${p}.count`] = "Repeat 1 to 50 times.";
        duration(b.work?.durationS, `${p}.work.durationS`);
        target(b.work?.target, `${p}.work.target`);
        if (b.recovery) {
          duration(b.recovery.durationS, `${p}.recovery.durationS`);
          if (b.recovery.target) target(b.recovery.target, `${p}.recovery.target`);
        }
        break;
      case "open":
        duration(b.durationS, `${p}.durationS`);
        break;
      default:
        errors[`${p}.kind`] = "Unknown block kind.";
    }
  });
  const total = blocks.reduce((s, b) => s + blockDuration(b), 0);
  if (Object.keys(errors).length === 0 && total > LIMITS.maxDurationS)
    errors.blocks = "A session can last at most 12 hours.";
  return errors;
}

export function blockDuration(b: Block): number {
  if (b.kind === "repeats") return b.count * (b.work.durationS + (b.recovery?.durationS ?? 0));
  return b.durationS;
}

/** Unrolls repeats into work and recovery steps with start times. */
export function expandBlocks(blocks: readonly Block[]): Step[] {
  const steps: Step[] = [];
  let t = 0;
  const push = (s: Omit<Step, "startS">) => {
    steps.push({ ...s, startS: t });
    t += s.durationS;
  };
  blocks.forEach((b, blockIndex) => {
    switch (b.kind) {
      case "repeats":
        for (let rep = 1; rep <= b.count; rep++) {
          push({
            blockIndex,
            kind: b.kind,
            part: "work",
            rep,
            durationS: b.work.durationS,
            metric: b.work.target.metric,
            lowPct: b.work.target.lowPct,
            highPct: b.work.target.highPct ?? b.work.target.lowPct,
            ramp: false,
          });
          if (b.recovery && b.recovery.durationS > 0) {
            const rt = b.recovery.target;
            push({
              blockIndex,
              kind: b.kind,
              part: "recovery",
              rep,
              durationS: b.recovery.durationS,
              metric: rt?.metric ?? null,
              lowPct: rt?.lowPct ?? null,
              highPct: rt ? (rt.highPct ?? rt.lowPct) : null,
              ramp: false,
            });
          }
        }
        break;
      case "ramp":
        push({
          blockIndex,
          kind: b.kind,
          part: "main",
          rep: null,
          durationS: b.durationS,
          metric: b.metric,
          lowPct: b.fromPct,
          highPct: b.toPct,
          ramp: true,
        });
        break;
      case "open":
        push({
          blockIndex,
          kind: b.kind,
          part: "main",
          rep: null,
          durationS: b.durationS,
          metric: null,
          lowPct: null,
          highPct: null,
          ramp: false,
        });
        break;
      default:
        push({
          blockIndex,
          kind: b.kind,
          part: "main",
          rep: null,
          durationS: b.durationS,
          metric: b.target.metric,
          lowPct: b.target.lowPct,
          highPct: b.target.highPct ?? b.target.lowPct,
          ramp: false,
        });
    }
  });
  return steps;
}

/**
 * Expected effort score (0–10) per minute in each band of the default power set (easy … extreme), used to plan
 * effort load before a session is done. Our own mapping of intensity to perceived effort (common practice; no single
 * published table). It is tied to the default set on purpose: a coach renaming or moving bands changes what is
 * shown, never the planned load numbers.
 */
export const BAND_EFFORT = [2, 3, 5, 7, 8.5, 10] as const;
const EFFORT_BANDS = defaultBandSet("bike:power").bands;

/** Expected effort score per minute at an intensity (% of threshold). */
export function effortPerMinute(pct: number): number {
  return BAND_EFFORT[bandIndexOf(Math.max(0, pct), EFFORT_BANDS)];
}

export interface SessionEstimate {
  durationS: number;
  /** Minutes in each band of the given set (index 0 = lowest band), by the step's mid-target; ramps sliced by second. */
  minutesPerBand: number[];
  /** Minutes without a target (open blocks, untargeted recoveries). minutesPerBand + openMinutes = duration. */
  openMinutes: number;
  /** Mechanical work of the power-targeted steps at mid-target (kJ); null without a power threshold or power steps. */
  workKj: number | null;
  plannedEffortLoad: number;
}

/**
 * Estimates a session before it is done: duration, minutes per band of `bands` (the default power set unless given),
 * work and planned effort load (minutes × expected effort score; untargeted minutes count as easy).
 */
export function estimateSession(
  blocks: readonly Block[],
  thresholds: Partial<Record<Metric, number>> = {},
  bands: readonly Band[] = EFFORT_BANDS,
): SessionEstimate {
  const errors = validateBlocks(blocks);
  const first = Object.values(errors)[0];
  if (first) throw new TrainingInputError("out_of_range", first);
  const powerThreshold = thresholds.power;
  if (powerThreshold !== undefined)
    requireFinite(powerThreshold, "Threshold power", { min: 0, exclusiveMin: true, max: 2500 });
  const minutesPerBand = new Array(bands.length).fill(0);
  let openMinutes = 0;
  let joules = 0;
  let hasPower = false;
  let effort = 0;
  for (const step of expandBlocks(blocks)) {
    if (step.lowPct === null || step.highPct === null) {
      openMinutes += step.durationS / 60;
      effort += (step.durationS / 60) * BAND_EFFORT[0];
      continue;
    }
    // A ramp is sliced into one-second pieces; a range counts at its middle.
    const slices = step.ramp ? step.durationS : 1;
    const sliceS = step.durationS / slices;
    for (let k = 0; k < slices; k++) {
      const pct = step.ramp
        ? step.lowPct + ((step.highPct - step.lowPct) * (k + 0.5)) / slices
        : (step.lowPct + step.highPct) / 2;
      minutesPerBand[bandIndexOf(pct, bands)] += sliceS / 60;
      effort += (sliceS / 60) * effortPerMinute(pct);
      if (step.metric === "power" && powerThreshold) {
        hasPower = true;
        joules += (pct / 100) * powerThreshold * sliceS;
      }
    }
  }
  const durationS = blocks.reduce((s, b) => s + blockDuration(b), 0);
  return { durationS, minutesPerBand, openMinutes, workKj: hasPower ? joules / 1000 : null, plannedEffortLoad: effort };
}
