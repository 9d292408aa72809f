/** After a field test is saved: undoing it within UNDO_DAYS, and the list of tests and thresholds with their sources. */
import { Op } from "sequelize";
import { lockRow, writeTransaction } from "../db";
import { env } from "../env";
import { queueEmail } from "../mail";
import { CoachAthlete, FieldTest, RescaleReport, Threshold, User } from "../models";
import { undoRescale } from "./rescale";
import { daysAgo, todayIn } from "~/lib/dates";
import { PROTOCOLS, type ProtocolKey } from "~/lib/protocols";
import { formatThreshold } from "~/lib/zone-table";
import { DomainError } from "../errors";
import { METRIC_LABEL } from "./field-tests";

export const UNDO_DAYS = 14;

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
