import { Op } from "sequelize";
import type { Transaction } from "sequelize";
import { z } from "zod";
import { lockRow, writeTransaction } from "../db";
import { env } from "../env";
import { queueEmail } from "../mail";
import { CoachAthlete, FieldTest, RescaleReport, Threshold, Upload, User } from "../models";
import { applyThreshold, countScope, examplesFor, undoRescale } from "./rescale";
import { loadActivity } from "./uploads";
import { computeThreshold, type ThresholdResult } from "~/lib/field-tests";
import { daysAgo, daysBetween, isIsoDate, todayIn } from "~/lib/dates";
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
  type Metric,
  type RampDetection,
  type Sample,
  type ThresholdSport,
} from "~/lib/training";
import { formatThreshold } from "~/lib/zone-table";
import { thresholdBandsText } from "./bands";
import { DomainError } from "../errors";

export const UNDO_DAYS = 14;

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

type Body = {
  protocol: ProtocolKey;
  inputs?: unknown;
  uploadId?: number | null;
  windowStartS?: number | null;
  testedOn: string;
};

/** The threshold in force on a date for one sport and metric. */
const thresholdOn = (athleteId: number, sport: string, metric: string, date: string) =>
  Threshold.findOne({
    where: { athleteId, sport, metric, effectiveFrom: { [Op.lte]: date } },
    order: [
      ["effectiveFrom", "DESC"],
      ["id", "DESC"],
    ],
  });

/** Runs the plausibility guard for a resolved submission with everything the database knows about the athlete. */
async function guardFor(
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
function roundThreshold(r: ThresholdResult) {
  return r.metric === "pace" ? Math.round(r.value * 10) / 10 : Math.round(r.value);
}

const METRIC_LABEL: Record<string, string> = { power: "power", heart_rate: "heart-rate", pace: "pace" };

/**
 * Saves a field test in one transaction: the test, the threshold from its date, the set-based rescale of every
 * planned step in scope, the report, and the summary e-mails. A repeated request key returns the first save.
 */
export async function saveTest(
  athlete: User,
  by: User,
  body: Body & { readiness?: unknown; requestKey?: string | null; confirmed?: boolean | null },
) {
  const protocol = PROTOCOLS[body.protocol];
  if (!isIsoDate(body.testedOn)) throw new DomainError("invalid", "Give the test date.", { field: "testedOn" });
  if (body.testedOn > todayIn(athlete.timezone))
    throw new DomainError("invalid", "A test cannot be dated in the future.", { field: "testedOn" });
  let readiness: z.infer<typeof readinessSchema> | null = null;
  if (protocol.maximal) {
    const parsed = readinessSchema.safeParse(body.readiness);
    if (!parsed.success)
      throw new DomainError("invalid", `Before a maximal test: ${parsed.error.issues[0].message}`, {
        field: "readiness",
      });
    readiness = parsed.data;
  }
  const { result, inputs, upload, fromFile } = await resolveSubmission(athlete, body);
  const value = roundThreshold(result);
  const guard = await guardFor(athlete, body, result, value, fromFile);
  if (guard.flagged && body.confirmed !== true) {
    throw new DomainError(
      "confirm_needed",
      `${guard.headline} Read the likely reasons and confirm the change to save it.`,
      { field: "confirm" },
    );
  }
  const coaches = await User.findAll({
    where: { id: (await CoachAthlete.findAll({ where: { athleteId: athlete.id } })).map((l) => l.coachId) },
  });
  return writeTransaction(async (transaction) => {
    // Checked inside the write lock (and, on PostgreSQL, the athlete's row lock), so two copies of one submission
    // cannot both pass it and two tests of one athlete rescale in turn, whichever instance they reach.
    await lockRow("users", athlete.id, transaction);
    if (body.requestKey) {
      const earlier = await FieldTest.findOne({ where: { requestKey: body.requestKey }, transaction });
      if (earlier) {
        if (earlier.athleteId !== athlete.id) throw new DomainError("conflict", "That request was already used.");
        return {
          test: earlier,
          report: await RescaleReport.findOne({ where: { fieldTestId: earlier.id, kind: "apply" }, transaction }),
          repeated: true,
        };
      }
    }
    const test = await FieldTest.create(
      {
        athleteId: athlete.id,
        protocol: body.protocol,
        sport: result.sport,
        metric: result.metric,
        inputs: inputs ?? {},
        derived: result.details,
        value,
        unit: result.unit,
        testedOn: body.testedOn,
        uploadId: upload?.id ?? null,
        readiness: readiness ? JSON.stringify(readiness) : null,
        requestKey: body.requestKey ?? null,
        createdBy: by.id,
      },
      { transaction },
    );
    const { report, threshold, previous } = await applyThreshold(
      {
        athleteId: athlete.id,
        sport: result.sport,
        metric: result.metric,
        value,
        unit: result.unit,
        from: body.testedOn,
        fieldTestId: test.id,
        createdBy: by.id,
      },
      transaction,
    );
    await test.update({ thresholdId: threshold.id }, { transaction });
    await report.update(
      {
        guard: { flagged: guard.flagged, changePct: guard.changePct, headline: guard.headline, reasons: guard.reasons },
        confirmedBy: guard.flagged ? by.id : null,
        confirmedAt: guard.flagged ? new Date() : null,
      },
      { transaction },
    );
    await queueRescaleSummary(
      {
        athlete,
        coaches,
        by,
        label: protocol.label.toLowerCase(),
        testedOn: body.testedOn,
        sport: result.sport,
        metric: result.metric,
        unit: result.unit,
        value,
        previous,
        report,
        guard,
      },
      transaction,
    );
    return { test, report, repeated: false };
  });
}

/**
 * The summary athlete and coaches get when a new threshold rescales the plan, from a saved test or a cross-check:
 * old and new value, how many sessions changed with examples, the new bands, and who confirmed a flagged change.
 */
export async function queueRescaleSummary(
  a: {
    athlete: User;
    coaches: User[];
    by: User;
    label: string;
    testedOn: string;
    sport: ThresholdSport;
    metric: Metric;
    unit: string;
    value: number;
    previous: { value: number } | null;
    report: RescaleReport;
    guard: GuardResult;
  },
  transaction: Transaction,
) {
  const { athlete, by, guard, report } = a;
  const guardNote = guard.flagged
    ? `${guard.headline} ${by.name} saw the likely reasons and confirmed the change${by.id === athlete.id ? "" : ` for ${athlete.name}`}.`
    : "";
  const examples =
    report.examples.map((e) => `${e.date} ${e.name}: ${e.before} → ${e.after}`).join("\n") ||
    "No planned sessions needed a change.";
  const bands = await thresholdBandsText(athlete, a.sport, a.metric, a.value, a.unit, transaction);
  for (const person of [athlete, ...a.coaches]) {
    await queueEmail(
      {
        to: person.email,
        template: "rescale-summary",
        vars: {
          recipientName: person.name,
          athleteName: athlete.name,
          testLabel: a.label,
          testedOn: a.testedOn,
          metricLabel: METRIC_LABEL[a.metric],
          newValue: formatThreshold(a.value, a.unit),
          oldValue: a.previous ? formatThreshold(a.previous.value, a.unit) : "not set",
          sessionsChanged: report.sessionsChanged,
          blocksChanged: report.blocksChanged,
          examples,
          bands,
          guardNote,
          link: `${env().appUrl}${person.id === athlete.id ? "/athlete/calendar" : `/coach/athletes/${athlete.id}/calendar`}`,
        },
      },
      transaction,
    );
  }
}

/**
 * Removes a test within 14 days: the threshold goes, every step it rescaled gets its old values back, the test stays
 * listed as undone (who and when), and athlete and coaches get a correction of the summary they were sent.
 */
export async function undoTest(athlete: User, by: User, testId: number) {
  const coaches = await User.findAll({
    where: { id: (await CoachAthlete.findAll({ where: { athleteId: athlete.id } })).map((l) => l.coachId) },
  });
  return writeTransaction(async (transaction) => {
    await lockRow("users", athlete.id, transaction);
    const test = await FieldTest.findOne({ where: { id: testId, athleteId: athlete.id }, transaction });
    if (!test) throw new DomainError("not_found", "No such test for this athlete.");
    if (test.status === "undone") throw new DomainError("invalid", "This test was already removed.");
    if (test.createdAt < daysAgo(UNDO_DAYS))
      throw new DomainError("invalid", `Tests can be removed for ${UNDO_DAYS} days after they were saved.`);
    const report = await RescaleReport.findOne({ where: { fieldTestId: test.id, kind: "apply" }, transaction });
    const threshold = test.thresholdId ? await Threshold.findByPk(test.thresholdId, { transaction }) : null;
    const undo = report ? await undoRescale(report, threshold, by.id, transaction) : null;
    const undoneAt = new Date();
    await test.update({ status: "undone", undoneAt, undoneBy: by.id, thresholdId: null }, { transaction });
    const restored = await Threshold.findOne({
      where: {
        athleteId: athlete.id,
        sport: test.sport,
        metric: test.metric,
        effectiveFrom: { [Op.lte]: test.testedOn },
      },
      order: [
        ["effectiveFrom", "DESC"],
        ["id", "DESC"],
      ],
      transaction,
    });
    for (const person of [athlete, ...coaches]) {
      await queueEmail(
        {
          to: person.email,
          template: "rescale-undone",
          vars: {
            recipientName: person.name,
            athleteName: athlete.name,
            testLabel: (PROTOCOLS[test.protocol as ProtocolKey]?.label ?? test.protocol).toLowerCase(),
            testedOn: test.testedOn,
            metricLabel: METRIC_LABEL[test.metric] ?? test.metric,
            removedValue: formatThreshold(test.value, test.unit),
            restoredValue: restored ? formatThreshold(restored.value, test.unit) : "not set",
            undoneBy: by.id === person.id ? "you" : by.name,
            undoneOn: todayIn(person.timezone),
            sessionsChanged: undo?.sessionsChanged ?? 0,
            blocksChanged: undo?.blocksChanged ?? 0,
            link: `${env().appUrl}${person.id === athlete.id ? "/athlete/calendar" : `/coach/athletes/${athlete.id}/calendar`}`,
          },
        },
        transaction,
      );
    }
    return { test, undo };
  });
}

const testWords = (t: FieldTest | undefined) =>
  t
    ? `the ${(PROTOCOLS[t.protocol as ProtocolKey]?.label ?? t.protocol).toLowerCase()} of ${t.testedOn}`
    : "a test no longer listed";

/** Where a threshold came from, in words: its test, the cross-checked pair and the choice made, or a typed value. */
export function thresholdBasis(t: Threshold, tests: Map<number, FieldTest>): string {
  if (t.sourceTests) {
    try {
      const src = JSON.parse(t.sourceTests) as { pair: [number, number]; choice: "a" | "b" | "mean" };
      const [a, b] = src.pair.map((id) => tests.get(id));
      if (src.choice === "mean") return `Cross-check: mean of ${testWords(a)} and ${testWords(b)}`;
      const [chosen, other] = src.choice === "a" ? [a, b] : [b, a];
      return `Cross-check: ${testWords(chosen)}, checked against ${testWords(other)}`;
    } catch {
      return "Cross-check";
    }
  }
  if (t.fieldTestId) return `From ${testWords(tests.get(t.fieldTestId))}`;
  return t.source === "seed" ? "Starting value" : "Set by hand";
}

export async function testHistory(athleteId: number) {
  const [tests, thresholds, reports] = await Promise.all([
    FieldTest.findAll({
      where: { athleteId },
      order: [
        ["testedOn", "DESC"],
        ["id", "DESC"],
      ],
    }),
    Threshold.findAll({
      where: { athleteId },
      order: [
        ["effectiveFrom", "ASC"],
        ["id", "ASC"],
      ],
    }),
    RescaleReport.findAll({ where: { athleteId }, order: [["id", "DESC"]], limit: 20 }),
  ]);
  // The threshold in force today per sport and metric: a test is "in force" only while its threshold is the latest.
  const latest = new Map<string, number>();
  for (const t of thresholds) latest.set(`${t.sport}:${t.metric}`, t.id);
  const inForce = new Set(latest.values());
  const people = await User.findAll({
    where: {
      id: [
        ...new Set(
          [...tests.map((t) => t.undoneBy), ...reports.map((r) => r.confirmedBy)].filter((x): x is number => !!x),
        ),
      ],
    },
    attributes: ["id", "name"],
  });
  const names = new Map(people.map((p) => [p.id, p.name]));
  const testsById = new Map(tests.map((t) => [t.id, t]));
  return {
    tests: tests.map((t) => ({
      id: t.id,
      protocol: t.protocol,
      label: PROTOCOLS[t.protocol as ProtocolKey]?.label ?? t.protocol,
      sport: t.sport,
      metric: t.metric,
      value: t.value,
      display: formatThreshold(t.value, t.unit),
      testedOn: t.testedOn,
      status: t.status,
      inForce: t.status === "active" && t.thresholdId !== null && inForce.has(t.thresholdId),
      undoneAt: t.undoneAt ? t.undoneAt.toISOString() : null,
      undoneBy: t.undoneBy ? (names.get(t.undoneBy) ?? "a former member") : null,
      canUndo: t.status === "active" && t.createdAt >= daysAgo(UNDO_DAYS),
      savedAt: t.createdAt.toISOString(),
    })),
    thresholds: thresholds.map((t) => ({
      id: t.id,
      sport: t.sport,
      metric: t.metric,
      value: t.value,
      unit: t.unit,
      display: formatThreshold(t.value, t.unit),
      effectiveFrom: t.effectiveFrom,
      source: t.source,
      basis: thresholdBasis(t, testsById),
    })),
    reports: reports.map((r) => ({
      id: r.id,
      fieldTestId: r.fieldTestId,
      kind: r.kind,
      sport: r.sport,
      metric: r.metric,
      oldValue: r.oldValue,
      newValue: r.newValue,
      unit: r.unit,
      fromDate: r.fromDate,
      sessions: r.sessionsChanged,
      blocks: r.blocksChanged,
      examples: r.examples,
      at: r.createdAt.toISOString(),
      guard: r.guard,
      confirmedBy: r.confirmedBy ? (names.get(r.confirmedBy) ?? null) : null,
    })),
  };
}
