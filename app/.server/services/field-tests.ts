/** Saving a field test: the threshold, the rescale of planned steps in scope, the report and the summary e-mails. */
import type { Transaction } from "sequelize";
import { z } from "zod";
import { lockRow, writeTransaction } from "../db";
import { env } from "../env";
import { queueEmail } from "../mail";
import { CoachAthlete, FieldTest, RescaleReport, User } from "../models";
import { applyThreshold } from "./rescale";
import { isIsoDate, todayIn } from "~/lib/dates";
import { PROTOCOLS } from "~/lib/protocols";
import type { GuardResult, Metric, ThresholdSport } from "~/lib/training";
import { formatThreshold } from "~/lib/zone-table";
import { thresholdBandsText } from "./bands";
import { DomainError } from "../errors";
import { guardFor, readinessSchema, resolveSubmission, roundThreshold, type Body } from "./field-test-proposal";

export const METRIC_LABEL: Record<string, string> = { power: "power", heart_rate: "heart-rate", pace: "pace" };

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
