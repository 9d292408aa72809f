import { DomainError } from "../errors";
import type { User } from "../models";
import { sessionDetail } from "./calendar";
import { bandSetsFor } from "./bands";
import { currentThresholds, thresholdSport, unitFor } from "./thresholds";
import type { UploadSummary } from "./uploads";
import { Threshold, Upload } from "../models";
import { Op } from "sequelize";
import { todayIn } from "~/lib/dates";
import { bandSetKeyFor, bandShade, minutesPerBand, type Metric } from "~/lib/training";
import { bandTable } from "~/lib/band-table";
import { blockBands } from "~/lib/schedule-text";
import { isPacedProtocol } from "~/lib/training";
import { pacingOutcome, pacingPlansFor } from "./pacing";

/**
 * What a session page shows: the session, its steps, the band of each block, the athlete's band tables for the
 * metrics it uses (their coach's sets), and time in band from an attached ride file.
 */
export async function sessionPageData(
  athlete: User,
  sessionId: number,
  opts: { lap?: { lengthM?: number | null; lapTimeS?: number | null } | null } = {},
) {
  const found = await sessionDetail(athlete.id, sessionId);
  if (!found) throw new DomainError("not_found", "No session with this id is on this calendar.");
  const { session, steps } = found;
  const tsport = thresholdSport(session.sport);
  const metrics = [...new Set(steps.map((s) => s.metric).filter((m): m is Metric => m !== null))];
  const current = tsport ? await currentThresholds(athlete.id, todayIn(athlete.timezone)) : [];
  const sets = await bandSetsFor(athlete);
  const zones = metrics.flatMap((metric) => {
    const t = current.find((c) => c.sport === tsport && c.metric === metric);
    // Swim pace has no band set of ours; the session lines already show swim targets.
    return t && tsport
      ? (bandTable(
          { sport: tsport, metric, value: t.value, unit: unitFor(tsport, metric) },
          sets[bandSetKeyFor(tsport, metric)],
        ) ?? [])
      : [];
  });
  const bandsByBlock = blockBands(steps, session.sport, sets);
  // Time in band from the attached file: power where the file has it, else heart rate, against the threshold in
  // effect on the session's day and the athlete's band set.
  let timeInBand: { metric: Metric; name: string; shade: string; minutes: number }[] | null = null;
  if (session.uploadId && tsport && tsport !== "swim") {
    const upload = await Upload.findOne({ where: { id: session.uploadId, athleteId: athlete.id } });
    const hists = (upload?.summary as Partial<UploadSummary> | undefined)?.histograms;
    const pick: [Metric, Record<string, number> | null | undefined][] = [
      ["power", hists?.power],
      ["heart_rate", hists?.hr],
    ];
    for (const [metric, hist] of pick) {
      if (!hist || timeInBand) continue;
      const thresholdSportName = metric === "power" ? "bike" : tsport;
      const threshold = await Threshold.findOne({
        where: { athleteId: athlete.id, sport: thresholdSportName, metric, effectiveFrom: { [Op.lte]: session.date } },
        order: [
          ["effectiveFrom", "DESC"],
          ["id", "DESC"],
        ],
      });
      if (!threshold) continue;
      const set = sets[bandSetKeyFor(thresholdSportName, metric)];
      timeInBand = minutesPerBand(hist, threshold.value, set).map((m, i) => ({
        metric,
        name: set.bands[i].name,
        shade: bandShade(i, set.bands.length),
        minutes: Math.round(m * 10) / 10,
      }));
    }
  }
  // A paced test's plan (with the loop the athlete entered, if any) and, once ridden, the file against it.
  let pacing = null;
  if (isPacedProtocol(session.testProtocol)) {
    const view = (
      await pacingPlansFor([session], { lap: opts.lap, systemKg: athlete.weightKg ? athlete.weightKg + 9 : null })
    ).get(session.id)!;
    pacing = { ...view, outcome: await pacingOutcome(athlete, session, view.plan), lap: opts.lap ?? null };
  }
  return {
    pacing,
    session: {
      id: session.id,
      date: session.date,
      timeOfDay: session.timeOfDay,
      name: session.name,
      sport: session.sport,
      status: session.status,
      testProtocol: session.testProtocol,
      notes: session.notes,
      description: session.description,
      plannedDurationS: session.plannedDurationS,
      effortScore: session.effortScore,
      actualMinutes: session.actualMinutes,
      comment: session.comment,
      targetedS: session.targetedS,
      inTargetS: session.inTargetS,
    },
    steps,
    zones,
    bandsByBlock,
    timeInBand,
  };
}
