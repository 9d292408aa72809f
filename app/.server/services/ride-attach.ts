/** Attaching an uploaded ride to a day: the planned session it completes, or an unplanned ride, with its load figures. */
import { Op } from "sequelize";
import { writeTransaction } from "../db";
import { ScheduledBlock, ScheduledSession, Threshold, Upload, type User } from "../models";
import { bandSetsFor } from "./bands";
import { activityHistograms, loadActivity, type UploadSummary } from "./uploads";
import { bandLoad, timeInTarget, trimpBanister, workKj } from "~/lib/training";
import { DomainError } from "../errors";

/**
 * Attaches a ride file to the planned session of its day (same sport, still planned), or keeps it as an unplanned
 * ride. Work, minutes per power band, band load and Banister TRIMP (from the athlete's resting and maximum heart
 * rate) are stored on the session.
 */
export async function attachRide(athlete: User, uploadId: number, date: string, effortScore: number | null) {
  const upload = await Upload.findOne({ where: { id: uploadId, athleteId: athlete.id } });
  if (!upload) throw new DomainError("not_found", "That upload is not yours.");
  const activity = await loadActivity(upload);
  const samples = activity.samples;
  const minutes = samples.length / 60;
  const hasPower = activity.meta.channels.includes("power");
  const power = await Threshold.findOne({
    where: { athleteId: athlete.id, sport: "bike", metric: "power", effectiveFrom: { [Op.lte]: date } },
    order: [["effectiveFrom", "DESC"]],
  });
  // Kept on the session as a record of the bands at the time; pages recompute time in band from the file's histogram.
  const powerSet = (await bandSetsFor(athlete))["bike:power"];
  const hist = (upload.summary as Partial<UploadSummary>).histograms ?? activityHistograms(activity);
  const banded = hasPower && power && hist.power ? bandLoad(hist.power, power.value, powerSet) : null;
  const zones = banded?.minutes ?? null;
  const hr = samples.map((s) => s.hr).filter((v): v is number => typeof v === "number");
  const trimp =
    hr.length > 60 && athlete.restingHr && athlete.maxHr
      ? trimpBanister({
          minutes: hr.length / 60,
          avgHr: hr.reduce((a, b) => a + b, 0) / hr.length,
          restHr: athlete.restingHr,
          maxHr: athlete.maxHr,
          sex: athlete.sex === "female" ? "female" : "male",
        })
      : null;
  const result = {
    workKj: hasPower ? workKj(samples) : null,
    trimp,
    zoneMinutes: zones ? JSON.stringify(zones) : null,
    bandLoad: banded ? Math.round(banded.load * 10) / 10 : null,
    uploadId: upload.id,
    actualMinutes: Math.round(minutes * 10) / 10,
  };
  return writeTransaction(async (transaction) => {
    const planned = await ScheduledSession.findOne({
      where: { athleteId: athlete.id, date, status: "planned", sport: "bike" },
      order: [["position", "ASC"]],
      transaction,
    });
    if (planned) {
      const steps = await ScheduledBlock.findAll({
        where: { scheduledSessionId: planned.id },
        order: [["position", "ASC"]],
        transaction,
      });
      const fit = hasPower
        ? timeInTarget(
            samples,
            steps.map((b) => ({
              durationS: b.durationS,
              low: b.metric === "power" ? b.lowAbs : null,
              high: b.metric === "power" ? b.highAbs : null,
              ramp: b.ramp,
            })),
          )
        : { targetedS: 0, inTargetS: 0 };
      await planned.update(
        {
          ...result,
          targetedS: fit.targetedS || null,
          inTargetS: fit.targetedS ? fit.inTargetS : null,
          status: "done",
          effortScore,
          completedAt: new Date(),
          feedSequence: planned.feedSequence + 1,
        },
        { transaction },
      );
      return { session: planned, matched: true };
    }
    const session = await ScheduledSession.create(
      {
        athleteId: athlete.id,
        date,
        name: "Unplanned ride",
        sport: "bike",
        status: "done",
        effortScore,
        completedAt: new Date(),
        plannedDurationS: 0,
        plannedLoad: 0,
        ...result,
      },
      { transaction },
    );
    return { session, matched: false };
  });
}
