/**
 * Runs inside a worker thread (see activity-worker.mjs): reading a ride file is CPU work that would otherwise stop
 * every other request while it runs. Pure: bytes in, plain data out. Imports are relative because the worker loads
 * this file without the app's bundler.
 */
import {
  bestEffort,
  detectRampTest,
  parseActivity,
  powerCurve,
  TrainingInputError,
  valueHistogram,
  workKj,
  type Activity,
} from "../../lib/training";

export interface ActivityLimits {
  /** Raw rows (CSV lines, GPX track points) read at most; checked before parsing. */
  maxRows: number;
  /** Seconds of riding a file may cover. */
  maxDurationS: number;
}

export interface ActivityTask {
  bytes: Uint8Array;
  name: string;
  limits: ActivityLimits;
  /** "summary" for a new upload: summary and trace only; "activity" for a stored one: the samples too. */
  want: "summary" | "activity";
}

export type ActivityTaskResult =
  | { ok: true; summary: UploadSummary; trace: TracePoint[]; activity: Activity | null }
  | { ok: false; kind: "invalid" | "too_large"; message: string };

export interface TracePoint {
  t: number;
  power: number | null;
  hr: number | null;
}

/** Best efforts the tests use, found once when the file arrives. */
export function summarize(activity: Activity) {
  const { samples, meta } = activity;
  const hasPower = meta.channels.includes("power");
  const efforts: Record<string, { startS: number; mean: number } | null> = {};
  for (const [key, w] of [
    ["1min", 60],
    ["3min", 180],
    ["8min", 480],
    ["12min", 720],
    ["20min", 1200],
  ] as const) {
    efforts[key] = hasPower && samples.length >= w ? bestEffort(samples, w) : null;
  }
  let ramp = null;
  if (hasPower) {
    try {
      ramp = detectRampTest(samples);
    } catch {
      ramp = null;
    }
  }
  let hrSum = 0;
  let hrCount = 0;
  let maxHr = -Infinity;
  for (const s of samples) {
    if (typeof s.hr !== "number") continue;
    hrSum += s.hr;
    hrCount++;
    if (s.hr > maxHr) maxHr = s.hr;
  }
  return {
    format: meta.format,
    startTime: meta.startTime,
    durationS: meta.durationS,
    channels: meta.channels,
    interpolatedS: meta.interpolatedS,
    stoppedS: meta.stoppedS,
    workKj: hasPower ? workKj(samples) : null,
    avgPower: hasPower ? samples.reduce((s, x) => s + (x.power ?? 0), 0) / samples.length : null,
    avgHr: hrCount ? hrSum / hrCount : null,
    // A loop, not Math.max(...values): spreading a long ride's samples overflows the call stack.
    maxHr: hrCount ? maxHr : null,
    efforts,
    ramp,
    curve: hasPower ? powerCurve(samples) : [],
    histograms: activityHistograms(activity),
    laps: meta.laps ?? null,
  };
}
export type UploadSummary = ReturnType<typeof summarize>;

/** Seconds per whole watt and per whole bpm: what time in band is computed from, for any threshold or band set. */
export function activityHistograms(activity: Activity) {
  const { samples, meta } = activity;
  return {
    power: meta.channels.includes("power") ? valueHistogram(samples.map((s) => s.power)) : null,
    hr: samples.some((s) => typeof s.hr === "number") ? valueHistogram(samples.map((s) => s.hr)) : null,
  };
}

/** A light trace for charts: one point every `step` seconds. */
export function traceOf(activity: Activity, step = 5): TracePoint[] {
  const out: TracePoint[] = [];
  for (let i = 0; i < activity.samples.length; i += step) {
    const s = activity.samples[i];
    out.push({ t: s.t, power: s.power ?? null, hr: s.hr ?? null });
  }
  return out;
}

/** Counts what the parser would have to read, without parsing: newlines for CSV, track points for GPX. */
export function roughRows(bytes: Uint8Array, name: string): number {
  const ext = name.toLowerCase().split(".").pop() ?? "";
  if (ext === "csv" || ext === "txt") {
    let n = 0;
    for (let i = 0; i < bytes.length; i++) if (bytes[i] === 0x0a) n++;
    return n;
  }
  if (ext === "gpx") {
    const needle = Buffer.from("<trkpt");
    const hay = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    let n = 0;
    for (let at = hay.indexOf(needle); at !== -1; at = hay.indexOf(needle, at + needle.length)) n++;
    return n;
  }
  return 0;
}

const hours = (s: number) => Math.round((s / 3600) * 10) / 10;

export default function readActivity(task: ActivityTask): ActivityTaskResult {
  const bytes = task.bytes instanceof Uint8Array ? task.bytes : new Uint8Array(task.bytes);
  const rows = roughRows(bytes, task.name);
  if (rows > task.limits.maxRows) {
    return {
      ok: false,
      kind: "too_large",
      message: `This file has about ${rows.toLocaleString("en")} rows; at most ${task.limits.maxRows.toLocaleString("en")} are read (${hours(task.limits.maxDurationS)} hours at one a second). Split it or export one ride.`,
    };
  }
  let activity: Activity;
  try {
    activity = parseActivity(bytes, task.name);
  } catch (err) {
    if (err instanceof TrainingInputError)
      return { ok: false, kind: "invalid", message: `This file cannot be used: ${err.message}` };
    throw err;
  }
  if (activity.meta.durationS > task.limits.maxDurationS) {
    return {
      ok: false,
      kind: "too_large",
      message: `This file covers ${hours(activity.meta.durationS)} hours; at most ${hours(task.limits.maxDurationS)} hours are read. Split it or export one ride.`,
    };
  }
  return {
    ok: true,
    summary: summarize(activity),
    trace: traceOf(activity),
    activity: task.want === "activity" ? activity : null,
  };
}
