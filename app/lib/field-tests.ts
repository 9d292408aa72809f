import { z } from "zod";
import {
  criticalPower,
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
}

const watts = z.coerce.number({ error: "Enter watts." }).positive("Enter a power above 0.").max(2500, "That is more than 2500 W; check the number.");
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
  ramp: z.object({ bestOneMinuteW: watts }),
  twenty_minute: z.object({ meanW: watts }),
  eight_minute: z.object({ meanW: watts, secondMeanW: watts.optional().or(z.literal("").transform(() => undefined)) }),
  critical_power: z.object({
    efforts: z
      .array(z.object({ duration: time, meanW: watts }))
      .min(2, "Give at least two efforts.")
      .max(4, "Give at most four efforts."),
  }),
  hr_thirty: z.object({ sport: z.enum(["bike", "run"]), meanHr: z.coerce.number().int().min(80, "Heart rate must be 80–230 bpm.").max(230, "Heart rate must be 80–230 bpm.") }),
  run_race: z.object({ distanceM: z.coerce.number().min(800, "Use a race of 800 m to 50 km.").max(50_000, "Use a race of 800 m to 50 km."), time }),
  swim_pair: z.object({ t400: time, t200: time }),
  manual: z.object({
    sport: z.enum(["bike", "run", "swim"]),
    metric: z.enum(["power", "heart_rate", "pace"]),
    value: z.coerce.number().positive("Enter a threshold above 0."),
  }),
} satisfies Record<ProtocolKey, z.ZodType>;

export const protocolSchema = z.enum(PROTOCOL_KEYS, { error: "Choose a test." });

/** Turns a test's typed (or file-derived) inputs into a threshold with the training engine. */
export function computeThreshold(protocol: ProtocolKey, raw: unknown): ThresholdResult {
  const parsed = testInputSchemas[protocol].safeParse(raw);
  if (!parsed.success) throw new TrainingInputError("out_of_range", parsed.error.issues[0].message);
  const v = parsed.data as Record<string, any>;
  switch (protocol) {
    case "ramp":
      return { sport: "bike", metric: "power", value: thresholdFromRamp(v.bestOneMinuteW), unit: "W", details: { bestOneMinuteW: v.bestOneMinuteW, factor: 0.75 } };
    case "twenty_minute":
      return { sport: "bike", metric: "power", value: thresholdFromTwentyMinute(v.meanW), unit: "W", details: { meanW: v.meanW, factor: 0.95 } };
    case "eight_minute": {
      const mean = v.secondMeanW ? (v.meanW + v.secondMeanW) / 2 : v.meanW;
      return { sport: "bike", metric: "power", value: thresholdFromEightMinute(mean), unit: "W", details: { meanW: mean, factor: 0.9 } };
    }
    case "critical_power": {
      const r = criticalPower(v.efforts.map((e: { duration: number; meanW: number }) => ({ durationS: e.duration, meanPowerW: e.meanW })));
      return { sport: "bike", metric: "power", value: r.cpW, unit: "W", details: { cpW: r.cpW, wPrimeJ: r.wPrimeJ, r2: r.r2, warnings: r.warnings.join(" ") || null } };
    }
    case "hr_thirty":
      return { sport: v.sport, metric: "heart_rate", value: v.meanHr, unit: "bpm", details: { meanHrLast20Min: v.meanHr } };
    case "run_race": {
      const index = runningIndex(v.distanceM, v.time);
      return { sport: "run", metric: "pace", value: thresholdPaceForIndex(index), unit: "s/km", details: { runningIndex: index, distanceM: v.distanceM, timeS: v.time } };
    }
    case "swim_pair": {
      const r = criticalSwimSpeed(v.t400, v.t200);
      return { sport: "swim", metric: "pace", value: r.pacePer100mS, unit: "s/100m", details: { speedMps: r.speedMps, dPrimeM: r.dPrimeM } };
    }
    case "manual": {
      const unit = v.metric === "power" ? "W" : v.metric === "heart_rate" ? "bpm" : v.sport === "swim" ? "s/100m" : "s/km";
      if (v.metric === "power" && v.sport !== "bike") throw new TrainingInputError("inconsistent", "Power thresholds are for cycling.");
      if (v.metric === "pace" && v.sport === "bike") throw new TrainingInputError("inconsistent", "Pace thresholds are for running and swimming.");
      return { sport: v.sport, metric: v.metric, value: v.value, unit, details: {} };
    }
  }
}
