/** The figures the load page and the coach roster show beside the daily series: power curves by period, compliance. */
import { Op } from "sequelize";
import { Upload, type User } from "../models";
import { addDays, todayIn } from "~/lib/dates";
import { loadSeries, round, type seriesFromRows } from "./load";

/** Best power for each window across the uploads of two 90-day periods: the last 90 days and the 90 before. */
export async function powerCurveComparison(athlete: User) {
  const today = todayIn(athlete.timezone);
  const uploads = await Upload.findAll({
    where: {
      athleteId: athlete.id,
      createdAt: { [Op.gte]: new Date(Date.parse(`${addDays(today, -180)}T00:00:00Z`)) },
    },
  });
  const cut = Date.parse(`${addDays(today, -90)}T00:00:00Z`);
  const best = (list: Upload[]) => {
    const m = new Map<number, number>();
    for (const u of list)
      for (const p of (u.summary as { curve?: { windowS: number; watts: number }[] }).curve ?? [])
        m.set(p.windowS, Math.max(m.get(p.windowS) ?? 0, p.watts));
    return m;
  };
  const recent = best(uploads.filter((u) => u.createdAt.getTime() >= cut));
  const before = best(uploads.filter((u) => u.createdAt.getTime() < cut));
  const windows = [...new Set([...recent.keys(), ...before.keys()])].sort((a, b) => a - b);
  return windows.map((w) => ({
    windowS: w,
    recent: recent.has(w) ? Math.round(recent.get(w)!) : null,
    previous: before.has(w) ? Math.round(before.get(w)!) : null,
  }));
}

/** Roster figures: sessions done / planned over the last four weeks, and whether the load ratio is a spike. */
export async function rosterLoad(athlete: User) {
  const today = todayIn(athlete.timezone);
  return rosterFigures(await loadSeries(athlete, addDays(today, -27), today));
}

export function rosterFigures(s: Pick<ReturnType<typeof seriesFromRows>, "weekly" | "latestRatio">) {
  const planned = s.weekly.reduce((a, w) => a + w.plannedSessions, 0);
  const done = s.weekly.reduce((a, w) => a + w.doneSessions, 0);
  return {
    compliance: planned ? round(done / planned, 2) : null,
    done,
    planned,
    ratio: s.latestRatio,
    spike: s.latestRatio !== null && s.latestRatio > 1.5,
  };
}
