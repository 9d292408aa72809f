import { z } from "zod";
import {
  checkRampRate,
  criticalPower,
  requirePlausibleThreshold,
  criticalSwimSpeed,
  runningIndex,
  thresholdFromEightMinute,
  thresholdFromRamp,
  thresholdFromTwentyMinute,
  thresholdPaceForIndex,
  TrainingInputError,
  type Metric,
} from "~/lib/training";
import { PROTOCOL_KEYS, type ProtocolKey } from "./protocols";
import { parseDuration } from "./duration";

export interface ThresholdResult {
  sport: "bike" | "run" | "swim";
  metric: Metric;
  value: number;
  unit: "W" | "bpm" | "s/km" | "s/100m";
  details: Record<string, number | string | null>;
  /** Reasons from the protocol itself to check this result; each one makes the plausibility guard ask for confirmation. */
  cautions: string[];
  /** The critical-power fit, for showing. */
  fit?: {
    cpW: number;
    wPrimeJ: number;
    r2: number;
    points: { durationS: number; meanPowerW: number; workJ: number; fittedWorkJ: number }[];
  };
  /** The ramp's rate and whether the 0.75 rule holds for it. */
  ramp?: { rateWPerMin: number; withinUsual: boolean };
}

/**
 * Typed powers are bounded per field: a mean power an adult can hold for that long, with room on both sides
 * (common practice, from memory: 20-minute means of world-class riders are near 450–500 W, best single minutes
 * of strong riders near 700–900 W). The bounds stop slips such as 0.0001 W or 1e300 W.
 */
const watts = (what: string, min: number, max: number) =>
  z.coerce
    .number({ error: `Enter the ${what} in watts.` })
    .refine(Number.isFinite, `Enter the ${what} in watts.`)
    .refine((v) => v >= min && v <= max, `The ${what} must be ${min}–${max} W; check the number.`);
const time = z
  .string()
  .trim()
  .transform((s, ctx) => {
    const v = parseDuration(s);
    if (v === null || v <= 0) {
      ctx.addIssue({ code: "custom", message: "Enter a time like 6:00 or 1:02:30." });
      return z.NEVER;
    }
    return v;
  });

/** Typed inputs per protocol; field names are what the test form posts. */
export const testInputSchemas = {
  ramp: z.object({
    bestOneMinuteW: watts("best one-minute power", 80, 1200),
    rampRateWPerMin: z.coerce
      .number({ error: "Give how many watts the ramp added each minute." })
      .refine(
        (v) => Number.isFinite(v) && v >= 1 && v <= 100,
        "The ramp rate must be 1–100 W per minute; check the number.",
      ),
  }),
  twenty_minute: z.object({ meanW: watts("20-minute mean power", 50, 700) }),
  eight_minute: z.object({
    meanW: watts("8-minute mean power", 50, 800),
    secondMeanW: watts("second 8-minute mean power", 50, 800)
      .optional()
      .or(z.literal("").transform(() => undefined)),
  }),
  critical_power: z.object({
    efforts: z
      .array(z.object({ duration: time, meanW: watts("effort's mean power", 50, 1500) }))
      .min(2, "Give at least two efforts.")
      .max(4, "Give at most four efforts."),
  }),
  hr_thirty: z.object({
    sport: z.enum(["bike", "run"]),
    meanHr: z.coerce
      .number()
      .int()
      .min(80, "Heart rate must be 80–230 bpm.")
      .max(230, "Heart rate must be 80–230 bpm."),
  }),
  run_race: z.object({
    distanceM: z.coerce.number().min(800, "Use a race of 800 m to 50 km.").max(50_000, "Use a race of 800 m to 50 km."),
    time,
  }),
  swim_pair: z.object({ t400: time, t200: time }),
  manual: z.object({
    sport: z.enum(["bike", "run", "swim"]),
    metric: z.enum(["power", "heart_rate", "pace"]),
    value: z.coerce
      .number({ error: "Enter the threshold as a number." })
      .refine(Number.isFinite, "Enter the threshold as a number."),
  }),
} satisfies Record<ProtocolKey, z.ZodType>;

export const protocolSchema = z.enum(PROTOCOL_KEYS, { error: "Choose a test." });

/** Turns a test's typed (or file-derived) inputs into a threshold with the training engine; refuses implausible values. */
export function computeThreshold(protocol: ProtocolKey, raw: unknown): ThresholdResult {
  const r = compute(protocol, raw);
  requirePlausibleThreshold(r.sport, r.metric as "power" | "heart_rate" | "pace", r.value);
  return r;
}

function compute(protocol: ProtocolKey, raw: unknown): ThresholdResult {
  const parsed = testInputSchemas[protocol].safeParse(raw);
  if (!parsed.success) throw new TrainingInputError("out_of_range", parsed.error.issues[0].message);
  // Each protocol's schema has just parsed these inputs; the switch below reads the ones of its own protocol.
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- a union of protocol inputs; each case reads its own
  const v = parsed.data as Record<string, any>;
  switch (protocol) {
    case "ramp": {
      const rate = checkRampRate(v.rampRateWPerMin);
      return {
        sport: "bike",
        metric: "power",
        value: thresholdFromRamp(v.bestOneMinuteW),
        unit: "W",
        details: {
          bestOneMinuteW: v.bestOneMinuteW,
          factor: 0.75,
          rampRateWPerMin: rate.rateWPerMin,
          rateWithinUsual: rate.withinUsual ? "yes" : "no",
        },
        cautions: rate.caution ? [rate.caution] : [],
        ramp: { rateWPerMin: rate.rateWPerMin, withinUsual: rate.withinUsual },
      };
    }
    case "twenty_minute":
      return {
        sport: "bike",
        metric: "power",
        value: thresholdFromTwentyMinute(v.meanW),
        unit: "W",
        details: { meanW: v.meanW, factor: 0.95 },
        cautions: [],
      };
    case "eight_minute": {
      const mean = v.secondMeanW ? (v.meanW + v.secondMeanW) / 2 : v.meanW;
      return {
        sport: "bike",
        metric: "power",
        value: thresholdFromEightMinute(mean),
        unit: "W",
        details: { meanW: mean, factor: 0.9 },
        cautions: [],
      };
    }
    case "critical_power": {
      const r = criticalPower(
        v.efforts.map((e: { duration: number; meanW: number }) => ({ durationS: e.duration, meanPowerW: e.meanW })),
      );
      return {
        sport: "bike",
        metric: "power",
        value: r.cpW,
        unit: "W",
        details: { cpW: r.cpW, wPrimeJ: r.wPrimeJ, r2: r.r2, warnings: r.warnings.join(" ") || null },
        cautions: r.warnings,
        fit: { cpW: r.cpW, wPrimeJ: r.wPrimeJ, r2: r.r2, points: r.points },
      };
    }
    case "hr_thirty":
      return {
        sport: v.sport,
        metric: "heart_rate",
        value: v.meanHr,
        unit: "bpm",
        details: { meanHrLast20Min: v.meanHr },
        cautions: [],
      };
    case "run_race": {
      const index = runningIndex(v.distanceM, v.time);
      return {
        sport: "run",
        metric: "pace",
        value: thresholdPaceForIndex(index),
        unit: "s/km",
        details: { runningIndex: index, distanceM: v.distanceM, timeS: v.time },
        cautions: [],
      };
    }
    case "swim_pair": {
      const r = criticalSwimSpeed(v.t400, v.t200);
      return {
        sport: "swim",
        metric: "pace",
        value: r.pacePer100mS,
        unit: "s/100m",
        details: { speedMps: r.speedMps, dPrimeM: r.dPrimeM },
        cautions: [],
      };
    }
    case "manual": {
      const unit =
        v.metric === "power" ? "W" : v.metric === "heart_rate" ? "bpm" : v.sport === "swim" ? "s/100m" : "s/km";
      if (v.metric === "power" && v.sport !== "bike")
        throw new TrainingInputError("inconsistent", "Power thresholds are for cycling.");
      if (v.metric === "pace" && v.sport === "bike")
        throw new TrainingInputError("inconsistent", "Pace thresholds are for running and swimming.");
      return { sport: v.sport, metric: v.metric, value: v.value, unit, details: {}, cautions: [] };
    }
  }
}

/** Undoing one saved test (the tests page's action and its Undo buttons). */
export const undoTestSchema = z.object({
  testId: z.coerce.number({ error: "Choose a test to undo." }).int().positive("Choose a test to undo."),
});

/**
 * Settling two close tests: which one sets the threshold. `confirmed` is the tick asked for when the change is
 * large; the service decides when that is.
 */
export const crossCheckSchema = z.object({
  aId: z.coerce.number().int().positive(),
  bId: z.coerce.number().int().positive(),
  choice: z.enum(["a", "b", "mean"], { error: "Choose one test or their mean." }),
  confirmed: z.literal("1").optional(),
});
