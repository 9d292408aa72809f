import { Op } from "sequelize";
import { writeTransaction } from "../db";
import { CoachAthlete, FieldTest, Threshold, User } from "../models";
import { applyThreshold } from "./rescale";
import { queueRescaleSummary } from "./field-tests";
import { DomainError } from "../errors";
import { PROTOCOLS, type ProtocolKey } from "~/lib/protocols";
import { checkPairWindow, crossCheck, CROSS_CHECK_DAYS, plausibilityGuard, type CrossCheck } from "~/lib/training";
import { formatThreshold } from "~/lib/zone-table";

type Metric = "power" | "heart_rate" | "pace";
type Sport = "bike" | "run" | "swim";

export interface CrossCheckPair {
  sport: Sport;
  metric: Metric;
  unit: string;
  tests: { id: number; label: string; testedOn: string; value: number; display: string }[];
  days: number;
  check: CrossCheck;
  meanDisplay: string;
  /** When a threshold already came from this pair: which choice, and the value. */
  settled: { choice: "a" | "b" | "mean"; display: string } | null;
}

const round = (metric: Metric, v: number) => (metric === "pace" ? Math.round(v * 10) / 10 : Math.round(v));

/**
 * The latest pair of active tests per sport and metric that lie within 14 days of each other (typed thresholds are
 * not tests and are left out).
 */
export async function crossChecksFor(athleteId: number): Promise<CrossCheckPair[]> {
  const tests = await FieldTest.findAll({
    where: { athleteId, status: "active", protocol: { [Op.ne]: "manual" } },
    order: [
      ["testedOn", "ASC"],
      ["id", "ASC"],
    ],
  });
  const settled = await Threshold.findAll({ where: { athleteId, source: "cross_check" }, order: [["id", "ASC"]] });
  const groups = new Map<string, FieldTest[]>();
  for (const t of tests) groups.set(`${t.sport}:${t.metric}`, [...(groups.get(`${t.sport}:${t.metric}`) ?? []), t]);
  const out: CrossCheckPair[] = [];
  for (const list of groups.values()) {
    for (let i = list.length - 1; i > 0; i--) {
      const [a, b] = [list[i - 1], list[i]];
      const days = checkPairWindow(a.testedOn, b.testedOn);
      if (days > CROSS_CHECK_DAYS) continue;
      const metric = a.metric as Metric;
      const check = crossCheck(a.value, b.value, metric);
      const from = settled.filter((s) => s.sourceTests && sameIds(JSON.parse(s.sourceTests).pair, [a.id, b.id])).at(-1);
      out.push({
        sport: a.sport as Sport,
        metric,
        unit: a.unit,
        tests: [a, b].map((t) => ({
          id: t.id,
          label: PROTOCOLS[t.protocol as ProtocolKey]?.label ?? t.protocol,
          testedOn: t.testedOn,
          value: t.value,
          display: formatThreshold(t.value, t.unit),
        })),
        days,
        check,
        meanDisplay: formatThreshold(round(metric, check.mean), a.unit),
        settled: from
          ? { choice: JSON.parse(from.sourceTests!).choice, display: formatThreshold(from.value, from.unit) }
          : null,
      });
      break;
    }
  }
  return out;
}

const sameIds = (x: unknown, y: number[]) => Array.isArray(x) && x.length === y.length && x.every((v, i) => v === y[i]);

/**
 * Sets the threshold from a cross-checked pair: one test's estimate or their mean, effective from the later test's
 * date. It goes through the same path as a saved test: the plausibility guard against the threshold then in force
 * (a flagged change needs `confirmed`), the set-based rescale, and the report with the guard and who confirmed it.
 * The threshold records the pair and the choice in `sourceTests`.
 */
export async function applyCrossCheck(
  athlete: User,
  by: User,
  input: { aId: number; bId: number; choice: string; confirmed?: boolean },
) {
  if (!["a", "b", "mean"].includes(input.choice)) throw new DomainError("invalid", "Choose one test or their mean.");
  const choice = input.choice as "a" | "b" | "mean";
  const [a, b] = await Promise.all(
    [input.aId, input.bId].map((id) =>
      Number.isInteger(id) && id > 0
        ? FieldTest.findOne({ where: { id, athleteId: athlete.id, status: "active" } })
        : null,
    ),
  );
  if (!a || !b || a.id === b.id) throw new DomainError("not_found", "These tests are not this athlete's active tests.");
  const [first, second] = a.testedOn <= b.testedOn ? [a, b] : [b, a];
  if (first.sport !== second.sport || first.metric !== second.metric)
    throw new DomainError("invalid", "A cross-check needs two tests of the same sport and metric.");
  if (checkPairWindow(first.testedOn, second.testedOn) > CROSS_CHECK_DAYS)
    throw new DomainError("invalid", `A cross-check needs two tests within ${CROSS_CHECK_DAYS} days of each other.`);
  const metric = first.metric as Metric;
  const sport = first.sport as Sport;
  const picked = choice === "a" ? first : choice === "b" ? second : null;
  const value = picked ? picked.value : round(metric, crossCheck(first.value, second.value, metric).mean);
  const from = second.testedOn;
  const current = await Threshold.findOne({
    where: { athleteId: athlete.id, sport, metric, effectiveFrom: { [Op.lte]: from } },
    order: [
      ["effectiveFrom", "DESC"],
      ["id", "DESC"],
    ],
  });
  const guard = plausibilityGuard({
    sport,
    metric,
    proposed: value,
    current: current?.value ?? null,
    protocolLabel: "Cross-check",
    previousProtocolLabel: null,
    typed: false,
    daysSinceLastTest: null,
    profile: { weightKg: athlete.weightKg, maxHr: athlete.maxHr },
  });
  if (guard.flagged && input.confirmed !== true) {
    throw new DomainError(
      "confirm_needed",
      `${guard.headline} Read the likely reasons and confirm the change to save it.`,
      { field: "confirm" },
    );
  }
  const coaches = await User.findAll({
    where: { id: (await CoachAthlete.findAll({ where: { athleteId: athlete.id } })).map((l) => l.coachId) },
  });
  const labelOf = (t: FieldTest) => (PROTOCOLS[t.protocol as ProtocolKey]?.label ?? t.protocol).toLowerCase();
  const label = picked
    ? `cross-check (the ${labelOf(picked)} of ${picked.testedOn}, checked against the ${labelOf(picked === first ? second : first)} of ${(picked === first ? second : first).testedOn})`
    : `cross-check (the mean of the ${labelOf(first)} of ${first.testedOn} and the ${labelOf(second)} of ${second.testedOn})`;
  return writeTransaction(async (transaction) => {
    // No single field test owns this threshold (sourceTests names them), so undoing one test keeps to its own
    // rescale report and never picks up this one.
    const { report, threshold, previous } = await applyThreshold(
      { athleteId: athlete.id, sport, metric, value, unit: first.unit, from, fieldTestId: null, createdBy: by.id },
      transaction,
    );
    await threshold.update(
      {
        source: "cross_check",
        sourceTests: JSON.stringify({
          pair: [first.id, second.id],
          choice,
          tests: picked ? [picked.id] : [first.id, second.id],
        }),
      },
      { transaction },
    );
    await report.update(
      {
        guard: { flagged: guard.flagged, changePct: guard.changePct, headline: guard.headline, reasons: guard.reasons },
        confirmedBy: guard.flagged ? by.id : null,
        confirmedAt: guard.flagged ? new Date() : null,
      },
      { transaction },
    );
    await queueRescaleSummary(
      { athlete, coaches, by, label, testedOn: from, sport, metric, unit: first.unit, value, previous, report, guard },
      transaction,
    );
    return { threshold, report, value };
  });
}
