/** A field test before it is saved: its inputs from a file or typed, the threshold they give, and the guard. */
import { Op } from "sequelize";
import { z } from "zod";
import { FieldTest, Threshold, Upload, User } from "../models";
import { countScope, examplesFor } from "./rescale";
import { loadActivity } from "./uploads";
import { computeThreshold, type ThresholdResult } from "~/lib/field-tests";
import { daysBetween, isIsoDate, todayIn } from "~/lib/dates";
import { PROTOCOLS, READINESS, type ProtocolKey } from "~/lib/protocols";
import {
  bestEffort,
  detectRampTest,
  pacingAdvice,
  pacingSplits,
  plausibilityGuard,
  thresholdHeartRate,
  TrainingInputError,
  type GuardResult,
  type RampDetection,
  type Sample,
} from "~/lib/training";
import { formatThreshold } from "~/lib/zone-table";
import { DomainError } from "../errors";

/** The window each protocol reads from a file, in seconds. */
const WINDOW: Partial<Record<ProtocolKey, number>> = { twenty_minute: 1200, eight_minute: 480, hr_thirty: 1800 };

/**
 * Derives a protocol's inputs from a stored ride file: the best window (or the one the user shifted to), its pacing
 * in thirds and, for the ramp, the detected steps. Returns inputs for computeThreshold plus what to show.
 */
export async function inputsFromUpload(protocol: ProtocolKey, upload: Upload, windowStartS?: number) {
  const activity = await loadActivity(upload);
  const samples = activity.samples;
  const window = WINDOW[protocol];
  try {
    if (protocol === "ramp") {
      let ramp: RampDetection;
      try {
        ramp = detectRampTest(samples);
      } catch (err) {
        if (err instanceof TrainingInputError && err.code === "not_a_ramp") {
          throw new DomainError(
            "invalid",
            "No ramp of equal rising steps was found in this file, so its rate is unknown. Type the best minute and how many watts the ramp added each minute instead.",
          );
        }
        throw err;
      }
      const lengthS = ramp.endS - ramp.startS;
      return {
        inputs: { bestOneMinuteW: ramp.bestOneMinuteW, rampRateWPerMin: ramp.rateWPerMin },
        window: { startS: ramp.startS, lengthS },
        pacing: null,
        ramp,
        file: windowFacts(samples, ramp.startS, lengthS),
      };
    }
    if (protocol === "critical_power") {
      const three = bestEffort(samples, 180);
      const twelve = bestEffort(samples, 720);
      return {
        inputs: {
          efforts: [
            { duration: "3:00", meanW: three.mean },
            { duration: "12:00", meanW: twelve.mean },
          ],
        },
        window: { startS: twelve.startS, lengthS: 720 },
        pacing: null,
        ramp: null,
        file: windowFacts(samples, twelve.startS, 720),
      };
    }
    if (window && (protocol === "twenty_minute" || protocol === "eight_minute")) {
      const start = windowStartS ?? bestEffort(samples, window).startS;
      if (!Number.isInteger(start) || start < 0 || start + window > samples.length)
        throw new DomainError("invalid", "The chosen window runs past the end of the ride.");
      const split = pacingSplits(samples, start, window, 3);
      const pacing = { ...split, advice: pacingAdvice(split.verdict, split.changePct) };
      const mean = samples.slice(start, start + window).reduce((s, x) => s + (x.power ?? 0), 0) / window;
      return {
        inputs: { meanW: mean },
        window: { startS: start, lengthS: window },
        pacing,
        ramp: null,
        file: windowFacts(samples, start, window),
      };
    }
    if (protocol === "hr_thirty") {
      const hr = samples.map((s) => s.hr ?? null);
      if (hr.length < 1800) throw new DomainError("invalid", "The file is shorter than 30 minutes.");
      // The 30 minutes with the highest mean heart rate, unless the user shifted the window.
      let start = windowStartS ?? 0;
      if (windowStartS === undefined) {
        let best = -1;
        let sum = 0;
        for (let i = 0; i < hr.length; i++) {
          sum += hr[i] ?? 0;
          if (i >= 1800) sum -= hr[i - 1800] ?? 0;
          if (i >= 1799 && sum > best) {
            best = sum;
            start = i - 1799;
          }
        }
      }
      const meanHr = thresholdHeartRate(hr.slice(start, start + 1800));
      return {
        inputs: { sport: "bike", meanHr: Math.round(meanHr) },
        window: { startS: start, lengthS: 1800 },
        pacing: null,
        ramp: null,
        file: null,
      };
    }
  } catch (err) {
    if (err instanceof TrainingInputError)
      throw new DomainError(
        "invalid",
        `This file cannot be used for a ${PROTOCOLS[protocol].label.toLowerCase()}: ${err.message}`,
      );
    throw err;
  }
  throw new DomainError("invalid", "This test is entered by hand, not from a file.");
}

/** Seconds without power in a test window (dropouts and stops) and its mean heart rate, for the guard's reasons. */
function windowFacts(samples: readonly Sample[], startS: number, lengthS: number) {
  let gapS = 0;
  let hrSum = 0;
  let hrN = 0;
  for (let i = startS; i < startS + lengthS && i < samples.length; i++) {
    const s = samples[i];
    if (!(typeof s.power === "number" && s.power > 0)) gapS++;
    if (typeof s.hr === "number" && s.hr > 0) {
      hrSum += s.hr;
      hrN++;
    }
  }
  return { gapS, windowS: lengthS, meanHr: hrN > lengthS / 2 ? hrSum / hrN : null };
}

export const readinessSchema = z.object(
  {
    answers: z
      .array(z.enum(["yes", "no"], { error: "Answer every readiness question." }))
      .length(READINESS.questions.length, "Answer every readiness question."),
    stopSignsRead: z.literal(true, { error: "Confirm that you have read the stop signs." }),
  },
  { error: "Answer every readiness question and confirm the stop signs." },
);

/** Resolves a submission (typed inputs or a file) to the threshold it proposes. */
export async function resolveSubmission(
  athlete: User,
  body: { protocol: ProtocolKey; inputs?: unknown; uploadId?: number | null; windowStartS?: number | null },
) {
  let inputs = body.inputs;
  let fromFile: Awaited<ReturnType<typeof inputsFromUpload>> | null = null;
  let upload: Upload | null = null;
  if (body.uploadId) {
    upload = await Upload.findOne({ where: { id: body.uploadId, athleteId: athlete.id } });
    if (!upload) throw new DomainError("not_found", "That upload is not this athlete's.");
    fromFile = await inputsFromUpload(body.protocol, upload, body.windowStartS ?? undefined);
    inputs = fromFile.inputs;
  }
  let result: ThresholdResult;
  try {
    result = computeThreshold(body.protocol, inputs);
  } catch (err) {
    if (err instanceof TrainingInputError) throw new DomainError("invalid", err.message);
    throw err;
  }
  return { result, inputs, fromFile, upload };
}

export type Body = {
  protocol: ProtocolKey;
  inputs?: unknown;
  uploadId?: number | null;
  windowStartS?: number | null;
  testedOn: string;
};

/** The threshold in force on a date for one sport and metric. */
export const thresholdOn = (athleteId: number, sport: string, metric: string, date: string) =>
  Threshold.findOne({
    where: { athleteId, sport, metric, effectiveFrom: { [Op.lte]: date } },
    order: [
      ["effectiveFrom", "DESC"],
      ["id", "DESC"],
    ],
  });

/** Runs the plausibility guard for a resolved submission with everything the database knows about the athlete. */
export async function guardFor(
  athlete: User,
  body: Body,
  result: ThresholdResult,
  value: number,
  fromFile: Awaited<ReturnType<typeof inputsFromUpload>> | null,
): Promise<GuardResult> {
  const current = await thresholdOn(athlete.id, result.sport, result.metric, body.testedOn);
  const currentTest = current?.fieldTestId ? await FieldTest.findByPk(current.fieldTestId) : null;
  const lastTest = await FieldTest.findOne({
    where: {
      athleteId: athlete.id,
      sport: result.sport,
      metric: result.metric,
      status: "active",
      testedOn: { [Op.lte]: body.testedOn },
    },
    order: [
      ["testedOn", "DESC"],
      ["id", "DESC"],
    ],
  });
  const hrThreshold =
    result.metric === "power" ? await thresholdOn(athlete.id, result.sport, "heart_rate", body.testedOn) : null;
  const meanHr = fromFile?.file?.meanHr ?? null;
  return plausibilityGuard({
    sport: result.sport,
    metric: result.metric as "power" | "heart_rate" | "pace",
    proposed: value,
    current: current?.value ?? null,
    protocolLabel: body.protocol === "manual" ? "typed threshold" : PROTOCOLS[body.protocol].label,
    // A threshold typed in (on its own or as the "enter a threshold" test) is named as such in the reasons.
    previousProtocolLabel:
      currentTest && currentTest.protocol !== "manual"
        ? (PROTOCOLS[currentTest.protocol as ProtocolKey]?.label ?? null)
        : current
          ? "typed threshold"
          : null,
    typed: !fromFile,
    daysSinceLastTest: lastTest ? daysBetween(lastTest.testedOn, body.testedOn) : null,
    cautions: result.cautions,
    pacing: fromFile?.pacing ?? null,
    gaps: fromFile?.file ? { gapS: fromFile.file.gapS, windowS: fromFile.file.windowS } : null,
    heartRate: meanHr && hrThreshold && body.protocol !== "ramp" ? { meanHr, thresholdHr: hrThreshold.value } : null,
    profile: { weightKg: athlete.weightKg, maxHr: athlete.maxHr },
  });
}

export async function preview(athlete: User, body: Body) {
  if (!isIsoDate(body.testedOn)) throw new DomainError("invalid", "Give the test date.", { field: "testedOn" });
  if (body.testedOn > todayIn(athlete.timezone))
    throw new DomainError("invalid", "A test cannot be dated in the future.", { field: "testedOn" });
  const { result, fromFile } = await resolveSubmission(athlete, body);
  const current = await thresholdOn(athlete.id, result.sport, result.metric, body.testedOn);
  const scope = { athleteId: athlete.id, sport: result.sport, metric: result.metric, from: body.testedOn };
  const counts = await countScope(scope);
  const value = roundThreshold(result);
  const { cautions: _c, fit, ramp: rampRule, ...rest } = result;
  return {
    proposed: { ...rest, value, label: formatThreshold(value, result.unit) },
    current: current
      ? { value: current.value, label: formatThreshold(current.value, result.unit), since: current.effectiveFrom }
      : null,
    changes: { sessions: counts.sessions, blocks: counts.blocks, until: counts.until },
    examples: await examplesFor({ ...scope, value, unit: result.unit }),
    window: fromFile?.window ?? null,
    pacing: fromFile?.pacing ?? null,
    ramp: rampRule ? { ...rampRule, detected: fromFile?.ramp ?? null } : null,
    fit: fit ?? null,
    guard: await guardFor(athlete, body, result, value, fromFile),
  };
}

/** Thresholds are kept to what a person reads: watts and bpm whole, paces to the tenth of a second. */
export function roundThreshold(r: ThresholdResult) {
  return r.metric === "pace" ? Math.round(r.value * 10) / 10 : Math.round(r.value);
}
