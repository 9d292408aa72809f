/**
 * The daily load series: per-day rows from the database (sessions, rides, band minutes), the fitness/fatigue model
 * over them, weekly sums and the readiness notes. Over 300 lines because the row query, the model walk and the notes
 * share the series' day shape; the attach write and the page's side figures live in ride-attach.ts and load-figures.ts.
 */
import { Op, QueryTypes } from "sequelize";
import { db, writeTransaction } from "../db";
import { ScheduledSession, Threshold, Upload, type User } from "../models";
import { bandSetsFor } from "./bands";
import { activityHistograms, loadActivity, type UploadSummary } from "./uploads";
import { addDays, dayRange, daysBetween, mondayOf, todayIn, weekday } from "~/lib/dates";
import {
  acuteChronicRatio,
  effortLoad,
  fitnessFatigue,
  minutesPerBand,
  monotonyStrain,
  bandShade,
  bandAboveThreshold,
  ratioBand,
  usualWeekRange,
  type BandSet,
} from "~/lib/training";

export interface DayRow {
  date: string;
  status: string;
  effort_score: number | null;
  actual_minutes: number | null;
  planned_load: number;
  planned_duration_s: number;
  trimp: number | null;
  work_kj: number | null;
  test_protocol: string | null;
  targeted_s: number | null;
  in_target_s: number | null;
  band_load: number | null;
}

/** The date a ride file belongs to: its session's day when attached, else the day it was ridden where the athlete lives. */
function rideDate(upload: Upload, attached: Map<number, string>, timeZone: string) {
  const onSession = attached.get(upload.id);
  if (onSession) return onSession;
  const start = (upload.summary as Partial<UploadSummary>).startTime;
  const at = start && Number.isFinite(Date.parse(start)) ? new Date(start) : upload.createdAt;
  return todayIn(timeZone, at);
}

/**
 * Minutes per power band for each day from the athlete's ride files, attached to a session or not, classified with
 * the power threshold in effect on the ride's day and the athlete's band set. Files stored before histograms were
 * kept are read once and their summary completed.
 */
export async function rideBandMinutes(athlete: User, from: string, to: string, bands: BandSet) {
  const lo = new Date(Date.parse(`${addDays(from, -2)}T00:00:00Z`));
  const hi = new Date(Date.parse(`${addDays(to, 2)}T23:59:59Z`));
  const sessions = await ScheduledSession.findAll({
    where: { athleteId: athlete.id, uploadId: { [Op.ne]: null } },
    attributes: ["uploadId", "date"],
  });
  const attached = new Map(sessions.map((x) => [x.uploadId!, x.date]));
  const uploads = await Upload.findAll({
    where: {
      athleteId: athlete.id,
      [Op.or]: [{ createdAt: { [Op.between]: [lo, hi] } }, { id: { [Op.in]: [...attached.keys()] } }],
    },
  });
  const thresholds = await Threshold.findAll({
    where: { athleteId: athlete.id, sport: "bike", metric: "power" },
    order: [
      ["effectiveFrom", "ASC"],
      ["id", "ASC"],
    ],
  });
  const byDay = new Map<string, number[]>();
  for (const u of uploads) {
    const date = rideDate(u, attached, athlete.timezone);
    if (date < from || date > to) continue;
    const threshold = thresholds.filter((t) => t.effectiveFrom <= date).at(-1);
    if (!threshold) continue;
    let summary = u.summary as Partial<UploadSummary>;
    if (!summary.histograms) {
      try {
        summary = { ...summary, histograms: activityHistograms(await loadActivity(u)) };
        await writeTransaction((transaction) => u.update({ summary }, { transaction }));
      } catch {
        continue;
      }
    }
    if (!summary.histograms?.power) continue;
    const minutes = minutesPerBand(summary.histograms.power, threshold.value, bands);
    const day = byDay.get(date) ?? new Array(bands.bands.length).fill(0);
    minutes.forEach((m, k) => (day[k] += m));
    byDay.set(date, day);
  }
  return byDay;
}

/**
 * The athlete's daily load from `from` to `to`: effort load (score × minutes, Foster 2001), TRIMP and work from done
 * sessions up to today, and planned effort load from planned sessions after today. Fitness and fatigue run over the
 * whole series, done load then planned load, so the lines continue into the future.
 */
/** Fitness needs history: the model starts well before the window (six time constants of fatigue, one of fitness). */
export const warmStart = (from: string) => addDays(from, -84);

/** The session columns the load model reads, for one athlete or (with athlete_id) for a roster at once. */
export const DAY_COLUMNS =
  "date, status, effort_score, actual_minutes, planned_load, planned_duration_s, trimp, work_kj, test_protocol, targeted_s, in_target_s, band_load";

export async function loadSeries(athlete: User, from: string, to: string) {
  const today = todayIn(athlete.timezone);
  const warmFrom = warmStart(from);
  // The day rows and the ride minutes are independent reads: issued together, one waits while the other runs.
  const [rows, { powerBands, rides }] = await Promise.all([
    db().query<DayRow>(
      `SELECT ${DAY_COLUMNS} FROM scheduled_sessions WHERE athlete_id = ? AND date BETWEEN ? AND ? AND status != 'cancelled'`,
      {
        replacements: [athlete.id, warmFrom, to],
        type: QueryTypes.SELECT,
      },
    ),
    bandSetsFor(athlete).then(async (sets) => {
      const powerBands = sets["bike:power"];
      return { powerBands, rides: await rideBandMinutes(athlete, mondayOf(from), to, powerBands) };
    }),
  ]);
  return seriesFromRows({ rows, rides, powerBands, from, to, today });
}

/** The load model over rows already read: pure, so a roster can read every athlete's rows in one query. */
export function seriesFromRows({
  rows,
  rides,
  powerBands,
  from,
  to,
  today,
}: {
  rows: DayRow[];
  rides: Map<string, number[]>;
  powerBands: BandSet;
  from: string;
  to: string;
  today: string;
}) {
  const warmFrom = warmStart(from);
  const n = daysBetween(warmFrom, to) + 1;
  const nb = powerBands.bands.length;
  // Day i is warmFrom + i days: dates are made once here and rows find their day through a map, since parsing a
  // date string per row and per day was a large share of the series' own time.
  const dates = dayRange(warmFrom, n);
  const dayIndex = new Map<string, number>();
  const days = Array.from({ length: n }, (_, i) => {
    const date = dates[i];
    dayIndex.set(date, i);
    return {
      date,
      effortLoad: 0,
      powerLoad: 0,
      trimp: 0,
      workKj: 0,
      plannedLoad: 0,
      doneMinutes: 0,
      plannedMinutes: 0,
      done: 0,
      planned: 0,
      plannedAll: 0,
      targeted: 0,
      inTarget: 0,
      bandMinutes: rides.get(date) ?? (new Array(nb).fill(0) as number[]),
    };
  });
  for (const r of rows) {
    const at = dayIndex.get(r.date);
    const d = at === undefined ? undefined : days[at];
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
      if (r.effort_score !== null && r.actual_minutes !== null)
        d.effortLoad += effortLoad(r.effort_score, r.actual_minutes);
      else if (r.band_load !== null) {
        // A ride with power but no effort score still carries load: its band load stands in (see bandLoad).
        d.effortLoad += r.band_load;
        d.powerLoad += r.band_load;
      }
      d.trimp += r.trimp ?? 0;
      d.targeted += r.targeted_s ?? 0;
      d.inTarget += r.in_target_s ?? 0;
      d.workKj += r.work_kj ?? 0;
    } else if (r.status === "planned") {
      d.plannedLoad += r.planned_load;
    }
  }
  // Past days count what was done; future days count what is planned.
  const modelLoads = days.map((d) => (d.date <= today ? d.effortLoad : d.plannedLoad));
  const ff = fitnessFatigue(modelLoads);
  // History begins with the first recorded session: earlier days are unknown, not rest (see acuteChronicRatio).
  const firstRecord = rows.length
    ? daysBetween(
        warmFrom,
        rows.reduce((m, r) => (r.date < m ? r.date : m), rows[0].date),
      )
    : -1;
  const historyStart = Math.max(0, firstRecord);
  const rolling = acuteChronicRatio(modelLoads, { historyStart: firstRecord === -1 ? undefined : historyStart });
  const ewma = acuteChronicRatio(modelLoads, {
    method: "ewma",
    historyStart: firstRecord === -1 ? undefined : historyStart,
  });
  const daily = days
    .map((d, i) => ({
      date: d.date,
      future: d.date > today,
      effortLoad: round(d.effortLoad),
      powerLoad: round(d.powerLoad),
      plannedLoad: round(d.plannedLoad),
      trimp: round(d.trimp),
      workKj: round(d.workKj),
      fitness: round(ff[i].fitness),
      fatigue: round(ff[i].fatigue),
      balance: round(ff[i].balance),
      // The ratio describes load already carried; days ahead have none.
      acwrRolling: rolling[i] === null || d.date > today ? null : round(rolling[i]!, 2),
      acwrEwma: ewma[i] === null || d.date > today ? null : round(ewma[i]!, 2),
      bandMinutes: d.bandMinutes.map((m) => round(m)),
    }))
    .filter((d) => d.date >= from);

  const weeks = new Map<
    string,
    {
      week: string;
      plannedLoad: number;
      doneLoad: number;
      powerLoad: number;
      plannedSessions: number;
      doneSessions: number;
      plannedMinutes: number;
      doneMinutes: number;
      targeted: number;
      inTarget: number;
      bandMinutes: number[];
      loads: number[];
      usual: { low: number; high: number } | null;
    }
  >();
  const firstMonday = mondayOf(from);
  const todayIdx = daysBetween(warmFrom, today);
  const firstWeekday = weekday(warmFrom);
  for (let i = 0; i < n; i++) {
    const d = days[i];
    if (d.date < firstMonday) continue;
    const back = (firstWeekday + i) % 7;
    const w = i >= back ? days[i - back].date : mondayOf(d.date);
    // Weeks ahead are measured against the usual range as of today: only days already lived count as history.
    let e = weeks.get(w);
    if (!e) {
      const usual =
        firstRecord === -1
          ? null
          : usualWeekRange(modelLoads, Math.min(daysBetween(warmFrom, w), todayIdx + 1), { historyStart });
      e = {
        week: w,
        plannedLoad: 0,
        doneLoad: 0,
        powerLoad: 0,
        plannedSessions: 0,
        doneSessions: 0,
        plannedMinutes: 0,
        doneMinutes: 0,
        targeted: 0,
        inTarget: 0,
        bandMinutes: new Array(nb).fill(0) as number[],
        loads: [] as number[],
        usual: usual && { low: round(usual.low), high: round(usual.high) },
      };
    }
    e.doneLoad += d.effortLoad;
    e.powerLoad += d.powerLoad;
    e.plannedLoad += d.plannedAll;
    e.plannedSessions += d.planned;
    e.doneSessions += d.done;
    e.plannedMinutes += d.plannedMinutes;
    e.doneMinutes += d.doneMinutes;
    e.targeted += d.targeted;
    e.inTarget += d.inTarget;
    d.bandMinutes.forEach((m, k) => (e!.bandMinutes[k] += m));
    e.loads.push(d.date <= today ? d.effortLoad : d.plannedLoad);
    weeks.set(w, e);
  }
  const weekly = [...weeks.values()].map(({ loads, targeted, inTarget, ...w }) => {
    const ms = loads.length >= 2 ? monotonyStrain(loads) : null;
    return {
      ...w,
      plannedLoad: round(w.plannedLoad),
      doneLoad: round(w.doneLoad),
      powerLoad: round(w.powerLoad),
      plannedMinutes: Math.round(w.plannedMinutes),
      doneMinutes: Math.round(w.doneMinutes),
      bandMinutes: w.bandMinutes.map((m) => round(m)),
      compliance: w.plannedSessions ? round(w.doneSessions / w.plannedSessions, 2) : null,
      inTargetPct: targeted ? Math.round((inTarget / targeted) * 100) : null,
      monotony: ms?.monotony === null || !ms ? null : round(ms.monotony!, 2),
      strain: ms?.strain === null || !ms ? null : round(ms.strain!),
    };
  });
  const latest = daily.filter((d) => !d.future).at(-1);
  const historyDays = firstRecord === -1 ? 0 : Math.max(0, daysBetween(addDays(warmFrom, historyStart), today) + 1);
  return {
    today,
    from,
    to,
    daily,
    weekly,
    bands: powerBands.bands.map((b, i) => ({
      name: b.name,
      shade: bandShade(i, nb),
      aboveThreshold: bandAboveThreshold(b),
    })),
    historyDays,
    latestRatio: latest?.acwrRolling ?? null,
    latestEwma: latest?.acwrEwma ?? null,
    band: latest?.acwrRolling ? ratioBand(latest.acwrRolling) : null,
    readiness: readinessNote({
      today,
      daily,
      weekly,
      historyDays,
      ratio: latest?.acwrRolling ?? null,
      keyDays: rows
        .filter((r) => r.test_protocol && r.status === "planned" && r.date > today)
        .map((r) => r.date)
        .sort(),
    }),
  };
}

/**
 * A short plain-words note for the questions "is the load rising safely?" and "will the athlete be fresh for the
 * next key day?". Ratio bands follow Gabbett (2016) as guidance only; freshness compares the 7-day trend with the
 * 42-day trend of the impulse-response model (Banister et al. 1975). The wording and the 10 %-of-fitness margin
 * for "about even" are ours (common practice, no single source).
 */
function readinessNote(input: {
  today: string;
  daily: { date: string; fitness: number; fatigue: number; balance: number }[];
  weekly: { week: string; doneLoad: number; plannedLoad: number; usual: { low: number; high: number } | null }[];
  historyDays: number;
  ratio: number | null;
  keyDays: string[];
}): string[] {
  const notes: string[] = [];
  if (input.historyDays < 28) {
    notes.push(
      `Not enough history yet: the usual range needs 28 days of recorded sessions (${input.historyDays} so far).`,
    );
  } else if (input.ratio !== null) {
    const band = ratioBand(input.ratio);
    notes.push(
      band === "spike"
        ? "The last seven days are well above the usual load of the last four weeks: ease off before adding more."
        : band === "raised"
          ? "The last seven days are above the usual load: hold the load here for a few days."
          : band === "low"
            ? "The last seven days are lighter than usual: fine for recovery, but fitness will drift down if it lasts."
            : "The last seven days are within the usual load of the last four weeks: the rise is gentle.",
    );
  }
  const now = input.daily.find((d) => d.date === input.today);
  const freshness = (d: { fitness: number; balance: number }) =>
    d.balance > 0.1 * d.fitness
      ? "fresh"
      : d.balance < -0.1 * d.fitness
        ? "carrying fatigue"
        : "neither fresh nor tired";
  if (now && now.fitness > 0)
    notes.push(`Today the athlete is ${freshness(now)} (the 7-day trend against the 42-day trend).`);
  const key = input.keyDays.find((d) => d <= addDays(input.today, 21));
  const onKey = key ? input.daily.find((d) => d.date === key) : undefined;
  if (key && onKey && onKey.fitness > 0)
    notes.push(`Next field test ${key}: as planned, the athlete would arrive ${freshness(onKey)}.`);
  return notes;
}

export const round = (x: number, digits = 1) => Math.round(x * 10 ** digits) / 10 ** digits;
