import { Op, QueryTypes } from "sequelize";
import { db, writeTransaction } from "../db";
import { ScheduledBlock, ScheduledSession, Threshold, Upload, type User } from "../models";
import { loadActivity } from "./uploads";
import { addDays, daysBetween, mondayOf, todayIn } from "~/lib/dates";
import {
  acuteChronicRatio,
  effortLoad,
  fitnessFatigue,
  minutesInZones,
  monotonyStrain,
  powerLevels,
  ratioBand,
  timeInTarget,
  trimpBanister,
  workKj,
} from "~/lib/training";

export class LoadError extends Error {
  name = "LoadError";
  constructor(
    message: string,
    readonly status = 400,
  ) {
    super(message);
  }
}

/**
 * Attaches a ride file to the planned session of its day (same sport, still planned), or keeps it as an unplanned
 * ride. Work, minutes per power level and Banister TRIMP (from the athlete's resting and maximum heart rate) are
 * stored on the session.
 */
export async function attachRide(athlete: User, uploadId: number, date: string, effortScore: number | null) {
  const upload = await Upload.findOne({ where: { id: uploadId, athleteId: athlete.id } });
  if (!upload) throw new LoadError("That upload is not yours.", 404);
  const activity = await loadActivity(upload);
  const samples = activity.samples;
  const minutes = samples.length / 60;
  const hasPower = activity.meta.channels.includes("power");
  const power = await Threshold.findOne({ where: { athleteId: athlete.id, sport: "bike", metric: "power", effectiveFrom: { [Op.lte]: date } }, order: [["effectiveFrom", "DESC"]] });
  const zones = hasPower && power ? minutesInZones(samples.map((s) => s.power ?? null), powerLevels(power.value).zones.slice(0, -1).map((z) => z.hi!)) : null;
  const hr = samples.map((s) => s.hr).filter((v): v is number => typeof v === "number");
  const trimp =
    hr.length > 60 && athlete.restingHr && athlete.maxHr
      ? trimpBanister({ minutes: hr.length / 60, avgHr: hr.reduce((a, b) => a + b, 0) / hr.length, restHr: athlete.restingHr, maxHr: athlete.maxHr, sex: athlete.sex === "female" ? "female" : "male" })
      : null;
  const result = { workKj: hasPower ? workKj(samples) : null, trimp, zoneMinutes: zones ? JSON.stringify(zones) : null, uploadId: upload.id, actualMinutes: Math.round(minutes * 10) / 10 };
  return writeTransaction(async (transaction) => {
    const planned = await ScheduledSession.findOne({ where: { athleteId: athlete.id, date, status: "planned", sport: "bike" }, order: [["position", "ASC"]], transaction });
    if (planned) {
      const steps = await ScheduledBlock.findAll({ where: { scheduledSessionId: planned.id }, order: [["position", "ASC"]], transaction });
      const fit = hasPower
        ? timeInTarget(samples, steps.map((b) => ({ durationS: b.durationS, low: b.metric === "power" ? b.lowAbs : null, high: b.metric === "power" ? b.highAbs : null, ramp: b.ramp })))
        : { targetedS: 0, inTargetS: 0 };
      await planned.update({ ...result, targetedS: fit.targetedS || null, inTargetS: fit.targetedS ? fit.inTargetS : null, status: "done", effortScore, completedAt: new Date(), feedSequence: planned.feedSequence + 1 }, { transaction });
      return { session: planned, matched: true };
    }
    const session = await ScheduledSession.create(
      { athleteId: athlete.id, date, name: "Unplanned ride", sport: "bike", status: "done", effortScore, completedAt: new Date(), plannedDurationS: 0, plannedLoad: 0, ...result },
      { transaction },
    );
    return { session, matched: false };
  });
}

interface DayRow {
  date: string;
  status: string;
  effort_score: number | null;
  actual_minutes: number | null;
  planned_load: number;
  planned_duration_s: number;
  trimp: number | null;
  work_kj: number | null;
  zone_minutes: string | null;
  targeted_s: number | null;
  in_target_s: number | null;
}

/**
 * The athlete's daily load from `from` to `to`: effort load (score × minutes, Foster 2001), TRIMP and work from done
 * sessions up to today, and planned effort load from planned sessions after today. Fitness and fatigue run over the
 * whole series, done load then planned load, so the lines continue into the future.
 */
export async function loadSeries(athlete: User, from: string, to: string) {
  const today = todayIn(athlete.timezone);
  // Fitness needs history: start the model well before the window (six time constants of fatigue, one of fitness).
  const warmFrom = addDays(from, -84);
  const rows = await db().query<DayRow>(
    `SELECT date, status, effort_score, actual_minutes, planned_load, planned_duration_s, trimp, work_kj, zone_minutes, targeted_s, in_target_s
     FROM scheduled_sessions WHERE athlete_id = ? AND date BETWEEN ? AND ? AND status != 'cancelled'`,
    { replacements: [athlete.id, warmFrom, to], type: QueryTypes.SELECT },
  );
  const n = daysBetween(warmFrom, to) + 1;
  const days = Array.from({ length: n }, (_, i) => ({ date: addDays(warmFrom, i), effortLoad: 0, trimp: 0, workKj: 0, plannedLoad: 0, doneMinutes: 0, plannedMinutes: 0, done: 0, planned: 0, plannedAll: 0, targeted: 0, inTarget: 0, zones: new Array(7).fill(0) as number[] }));
  for (const r of rows) {
    const d = days[daysBetween(warmFrom, r.date)];
    if (!d) continue;
    d.plannedAll += r.planned_load;
    if (r.status !== "done" && r.planned_duration_s > 0) {
      d.planned++;
      d.plannedMinutes += r.planned_duration_s / 60;
    }
    if (r.status === "done") {
      if (r.planned_duration_s > 0) {
        d.planned++;
        d.plannedMinutes += r.planned_duration_s / 60;
      }
      d.done++;
      d.doneMinutes += r.actual_minutes ?? 0;
      if (r.effort_score !== null && r.actual_minutes !== null) d.effortLoad += effortLoad(r.effort_score, r.actual_minutes);
      d.trimp += r.trimp ?? 0;
      d.targeted += r.targeted_s ?? 0;
      d.inTarget += r.in_target_s ?? 0;
      d.workKj += r.work_kj ?? 0;
      if (r.zone_minutes) (JSON.parse(r.zone_minutes) as number[]).forEach((m, k) => (d.zones[k] += m));
    } else if (r.status === "planned") {
      d.plannedLoad += r.planned_load;
    }
  }
  // Past days count what was done; future days count what is planned.
  const modelLoads = days.map((d) => (d.date <= today ? d.effortLoad : d.plannedLoad));
  const ff = fitnessFatigue(modelLoads);
  const rolling = acuteChronicRatio(modelLoads);
  const ewma = acuteChronicRatio(modelLoads, { method: "ewma" });
  const daily = days
    .map((d, i) => ({
      date: d.date,
      future: d.date > today,
      effortLoad: round(d.effortLoad),
      plannedLoad: round(d.plannedLoad),
      trimp: round(d.trimp),
      workKj: round(d.workKj),
      fitness: round(ff[i].fitness),
      fatigue: round(ff[i].fatigue),
      balance: round(ff[i].balance),
      acwrRolling: rolling[i] === null ? null : round(rolling[i]!, 2),
      acwrEwma: ewma[i] === null ? null : round(ewma[i]!, 2),
    }))
    .filter((d) => d.date >= from);

  const weeks = new Map<string, { week: string; plannedLoad: number; doneLoad: number; plannedSessions: number; doneSessions: number; plannedMinutes: number; doneMinutes: number; targeted: number; inTarget: number; zones: number[]; loads: number[] }>();
  for (const d of days.filter((x) => x.date >= mondayOf(from))) {
    const w = mondayOf(d.date);
    const e = weeks.get(w) ?? { week: w, plannedLoad: 0, doneLoad: 0, plannedSessions: 0, doneSessions: 0, plannedMinutes: 0, doneMinutes: 0, targeted: 0, inTarget: 0, zones: new Array(7).fill(0) as number[], loads: [] as number[] };
    e.doneLoad += d.effortLoad;
    e.plannedLoad += d.plannedAll;
    e.plannedSessions += d.planned;
    e.doneSessions += d.done;
    e.plannedMinutes += d.plannedMinutes;
    e.doneMinutes += d.doneMinutes;
    e.targeted += d.targeted;
    e.inTarget += d.inTarget;
    d.zones.forEach((m, k) => (e.zones[k] += m));
    e.loads.push(d.date <= today ? d.effortLoad : d.plannedLoad);
    weeks.set(w, e);
  }
  const weekly = [...weeks.values()].map(({ loads, targeted, inTarget, ...w }) => {
    const ms = loads.length >= 2 ? monotonyStrain(loads) : null;
    return {
      ...w,
      plannedLoad: round(w.plannedLoad),
      doneLoad: round(w.doneLoad),
      plannedMinutes: Math.round(w.plannedMinutes),
      doneMinutes: Math.round(w.doneMinutes),
      zones: w.zones.map((m) => round(m)),
      compliance: w.plannedSessions ? round(w.doneSessions / w.plannedSessions, 2) : null,
      inTargetPct: targeted ? Math.round((inTarget / targeted) * 100) : null,
      monotony: ms?.monotony === null || !ms ? null : round(ms.monotony!, 2),
      strain: ms?.strain === null || !ms ? null : round(ms.strain!),
    };
  });
  const latest = daily.filter((d) => !d.future).at(-1);
  return { today, from, to, daily, weekly, latestRatio: latest?.acwrRolling ?? null, band: latest?.acwrRolling ? ratioBand(latest.acwrRolling) : null };
}

const round = (x: number, digits = 1) => Math.round(x * 10 ** digits) / 10 ** digits;

/** Best power for each window across the uploads of two 90-day periods: the last 90 days and the 90 before. */
export async function powerCurveComparison(athlete: User) {
  const today = todayIn(athlete.timezone);
  const uploads = await Upload.findAll({ where: { athleteId: athlete.id, createdAt: { [Op.gte]: new Date(Date.parse(`${addDays(today, -180)}T00:00:00Z`)) } } });
  const cut = Date.parse(`${addDays(today, -90)}T00:00:00Z`);
  const best = (list: Upload[]) => {
    const m = new Map<number, number>();
    for (const u of list) for (const p of (u.summary as { curve?: { windowS: number; watts: number }[] }).curve ?? []) m.set(p.windowS, Math.max(m.get(p.windowS) ?? 0, p.watts));
    return m;
  };
  const recent = best(uploads.filter((u) => u.createdAt.getTime() >= cut));
  const before = best(uploads.filter((u) => u.createdAt.getTime() < cut));
  const windows = [...new Set([...recent.keys(), ...before.keys()])].sort((a, b) => a - b);
  return windows.map((w) => ({ windowS: w, recent: recent.has(w) ? Math.round(recent.get(w)!) : null, previous: before.has(w) ? Math.round(before.get(w)!) : null }));
}

/** Roster figures: sessions done / planned over the last four weeks, and whether the load ratio is a spike. */
export async function rosterLoad(athlete: User) {
  const today = todayIn(athlete.timezone);
  const s = await loadSeries(athlete, addDays(today, -27), today);
  const planned = s.weekly.reduce((a, w) => a + w.plannedSessions, 0);
  const done = s.weekly.reduce((a, w) => a + w.doneSessions, 0);
  return { compliance: planned ? round(done / planned, 2) : null, done, planned, ratio: s.latestRatio, spike: s.latestRatio !== null && s.latestRatio > 1.5 };
}
