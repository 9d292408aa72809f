import Papa from "papaparse";
import { Op } from "sequelize";
import { writeTransaction } from "../db";
import { FieldTest, Threshold, Upload, User } from "../models";
import { bandSetsFor } from "./bands";
import { loadActivity, type UploadSummary } from "./uploads";
import {
  bandLoad,
  bandSetKeyFor,
  lapsFromSplits,
  lapTable,
  normaliseLaps,
  wPrimeBalance,
  type Activity,
  type LapMark,
} from "~/lib/training";
import { DomainError } from "../errors";

type StoredLaps = { laps: LapMark[]; efforts: (number | null)[]; marked: boolean };

/** The laps in use: the ones a user marked (with their effort scores), else the file's own. */
export function lapsOf(upload: Upload, length: number): StoredLaps {
  if (upload.laps) {
    try {
      const v = JSON.parse(upload.laps) as { laps: LapMark[]; efforts: (number | null)[] };
      return { laps: normaliseLaps(v.laps, length), efforts: v.efforts ?? [], marked: true };
    } catch {
      // a damaged value falls back to the file's laps
    }
  }
  const fromFile = (upload.summary as Partial<UploadSummary>)?.laps ?? null;
  return { laps: fromFile ?? [], efforts: [], marked: false };
}

/** The athlete's latest critical power and W′ from an active critical-power test on or before `date`. */
async function cpModel(athleteId: number, date: string) {
  const t = await FieldTest.findOne({
    where: { athleteId, protocol: "critical_power", status: "active", testedOn: { [Op.lte]: date } },
    order: [
      ["testedOn", "DESC"],
      ["id", "DESC"],
    ],
  });
  const d = t?.derived as { cpW?: number; wPrimeJ?: number } | undefined;
  return d?.cpW && d?.wPrimeJ ? { cpW: d.cpW, wPrimeJ: d.wPrimeJ, testedOn: t!.testedOn } : null;
}

const dateOf = (upload: Upload) =>
  ((upload.summary as Partial<UploadSummary>)?.startTime ?? upload.createdAt.toISOString()).slice(0, 10);

/**
 * Everything the ride page shows: a light trace (every 5 s) with W′ balance when the athlete has a critical power
 * and W′, the lap table with typed effort scores, and band load from power when a power threshold exists.
 */
export async function rideAnalysis(athlete: User, upload: Upload) {
  const activity = await loadActivity(upload);
  const summary = upload.summary as UploadSummary;
  const { samples } = activity;
  const hasPower = activity.meta.channels.includes("power");
  const date = dateOf(upload);
  const stored = lapsOf(upload, samples.length);
  const laps = lapTable(samples, stored.laps).map((r, i) => ({ ...r, effortScore: stored.efforts[i] ?? null }));
  const cp = hasPower ? await cpModel(athlete.id, date) : null;
  const wbal = cp ? wPrimeBalance(samples, cp.cpW, cp.wPrimeJ) : null;
  const step = 5;
  const trace: { t: number; power: number | null; hr: number | null; wbalKj: number | null }[] = [];
  for (let i = 0; i < samples.length; i += step) {
    trace.push({
      t: i,
      power: samples[i].power ?? null,
      hr: samples[i].hr ?? null,
      wbalKj: wbal ? Math.round(wbal.balanceJ[i] / 100) / 10 : null,
    });
  }
  let load = null;
  if (hasPower && summary.histograms?.power) {
    const threshold = await Threshold.findOne({
      where: { athleteId: athlete.id, sport: "bike", metric: "power", effectiveFrom: { [Op.lte]: date } },
      order: [
        ["effectiveFrom", "DESC"],
        ["id", "DESC"],
      ],
    });
    if (threshold) {
      const set = (await bandSetsFor(athlete))[bandSetKeyFor("bike", "power")];
      const r = bandLoad(summary.histograms.power, threshold.value, set);
      load = {
        value: Math.round(r.load),
        thresholdW: threshold.value,
        rows: set.bands.map((b, i) => ({
          name: b.name,
          minutes: Math.round(r.minutes[i] * 10) / 10,
          weight: r.weights[i],
        })),
      };
    }
  }
  return {
    ride: {
      id: upload.id,
      name: upload.originalName,
      date,
      durationS: summary.durationS,
      channels: summary.channels,
      workKj: summary.workKj,
      avgPower: summary.avgPower,
      avgHr: summary.avgHr,
    },
    trace,
    laps,
    lapsMarked: stored.marked,
    wPrime:
      cp && wbal
        ? {
            cpW: Math.round(cp.cpW),
            wPrimeJ: Math.round(cp.wPrimeJ),
            testedOn: cp.testedOn,
            tauS: Math.round(wbal.tauS),
            minKj: Math.round(wbal.minJ / 100) / 10,
          }
        : null,
    load,
    curve: summary.curve ?? [],
  };
}

const lapInput = (v: unknown) => (typeof v === "string" ? v : "");

/** "12:30" or "750" → seconds; null when it cannot be read. */
export function clockToSeconds(raw: string): number | null {
  const m = /^\s*(?:(\d{1,2}):)?(\d{1,3}):(\d{2})\s*$|^\s*(\d{1,6})\s*$/.exec(raw);
  if (!m) return null;
  if (m[4] !== undefined) return Number(m[4]);
  return Number(m[1] ?? 0) * 3600 + Number(m[2]) * 60 + Number(m[3]);
}

/**
 * Saves the laps a user marked (split points in m:ss or seconds; empty = back to the file's own laps) and the effort
 * score typed for each lap. Bad input is refused with its reason and changes nothing.
 */
export async function saveLaps(upload: Upload, input: { splits: unknown; efforts: unknown[] }) {
  const length = (upload.summary as UploadSummary).durationS;
  const raw = lapInput(input.splits)
    .split(/[,\s]+/)
    .filter(Boolean);
  const splits: number[] = [];
  for (const r of raw) {
    const s = clockToSeconds(r);
    if (s === null)
      throw new DomainError("invalid", `“${r}” is not a time; write splits as m:ss, separated by commas.`);
    if (s <= 0 || s >= length) throw new DomainError("invalid", `The split at ${r} lies outside the ride.`);
    splits.push(s);
  }
  const efforts = input.efforts.map((e) => {
    const v = String(e ?? "").trim();
    if (v === "") return null;
    const n = Number(v);
    if (!Number.isInteger(n) || n < 0 || n > 10)
      throw new DomainError("invalid", "An effort score is a whole number from 0 to 10.");
    return n;
  });
  let value: string | null;
  if (splits.length) {
    value = JSON.stringify({ laps: lapsFromSplits(splits, length), efforts });
  } else {
    // No splits: the file's own laps, keeping the effort scores typed for them.
    const own = (upload.summary as Partial<UploadSummary>)?.laps ?? [];
    value = efforts.some((e) => e !== null) && own.length ? JSON.stringify({ laps: own, efforts }) : null;
  }
  await writeTransaction((transaction) => upload.update({ laps: value }, { transaction }));
}

export const RIDE_CSV_COLUMNS = [
  "time_s",
  "power_w",
  "heart_rate_bpm",
  "cadence_rpm",
  "speed_mps",
  "distance_m",
] as const;

/** The resampled 1 Hz series the analysis used, one row a second; empty cells where the file had no reading. */
export function rideCsv(activity: Activity): string {
  const cell = (v: number | null | undefined, digits = 0) => (typeof v === "number" ? Number(v.toFixed(digits)) : "");
  return Papa.unparse({
    fields: [...RIDE_CSV_COLUMNS],
    data: activity.samples.map((s) => [
      s.t,
      cell(s.power),
      cell(s.hr),
      cell(s.cadence),
      cell(s.speed, 3),
      cell(s.distance, 1),
    ]),
  });
}

export function curveCsv(curve: { windowS: number; watts: number }[]): string {
  return Papa.unparse({
    fields: ["window_s", "best_mean_power_w"],
    data: curve.map((c) => [c.windowS, Math.round(c.watts * 10) / 10]),
  });
}
