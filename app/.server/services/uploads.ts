import crypto from "node:crypto";
import { MaxFileSizeExceededError, MaxFilesExceededError, MaxTotalSizeExceededError, parseFormData, type FileUpload } from "@remix-run/form-data-parser";
import { writeTransaction } from "../db";
import { Upload, type User } from "../models";
import { fileStorage } from "../storage";
import { bestEffort, detectRampTest, parseActivity, powerCurve, TrainingInputError, valueHistogram, workKj, type Activity } from "~/lib/training";

export const MAX_UPLOAD_BYTES = 25 * 1024 * 1024;
export const ALLOWED = ["csv", "gpx", "fit"] as const;

export class UploadError extends Error {
  name = "UploadError";
  constructor(
    message: string,
    readonly status: number,
  ) {
    super(message);
  }
}

/** Best efforts the tests use, found once when the file arrives. */
function summarize(activity: Activity) {
  const { samples, meta } = activity;
  const hasPower = meta.channels.includes("power");
  const efforts: Record<string, { startS: number; mean: number } | null> = {};
  for (const [key, w] of [["1min", 60], ["3min", 180], ["8min", 480], ["12min", 720], ["20min", 1200]] as const) {
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
  const hrValues = samples.map((s) => s.hr).filter((v): v is number => typeof v === "number");
  return {
    format: meta.format,
    startTime: meta.startTime,
    durationS: meta.durationS,
    channels: meta.channels,
    interpolatedS: meta.interpolatedS,
    stoppedS: meta.stoppedS,
    workKj: hasPower ? workKj(samples) : null,
    avgPower: hasPower ? samples.reduce((s, x) => s + (x.power ?? 0), 0) / samples.length : null,
    avgHr: hrValues.length ? hrValues.reduce((a, b) => a + b, 0) / hrValues.length : null,
    maxHr: hrValues.length ? Math.max(...hrValues) : null,
    efforts,
    ramp,
    curve: hasPower ? powerCurve(samples) : [],
    histograms: activityHistograms(activity),
    laps: meta.laps ?? null,
  };
}

/** Seconds per whole watt and per whole bpm: what time in band is computed from, for any threshold or band set. */
export function activityHistograms(activity: Activity) {
  const { samples, meta } = activity;
  return {
    power: meta.channels.includes("power") ? valueHistogram(samples.map((s) => s.power)) : null,
    hr: samples.some((s) => typeof s.hr === "number") ? valueHistogram(samples.map((s) => s.hr)) : null,
  };
}
export type UploadSummary = ReturnType<typeof summarize>;

/**
 * Takes one file from a multipart request: size and type are enforced while it streams (413 / 415), the engine
 * must be able to read it (400 with its reason), and only then is it stored and recorded. A file that fails any
 * check leaves nothing behind.
 */
export async function receiveUpload(request: Request, athlete: User, uploadedBy: User) {
  const type = request.headers.get("content-type") ?? "";
  if (!type.startsWith("multipart/form-data")) throw new UploadError("Send the file as multipart/form-data.", 415);
  const declared = Number(request.headers.get("content-length") ?? 0);
  if (declared > MAX_UPLOAD_BYTES + 64 * 1024) throw new UploadError("That file is larger than 25 MB.", 413);
  let received: { name: string; bytes: Uint8Array } | null = null;
  let refused: UploadError | null = null;
  const handler = async (file: FileUpload) => {
    if (file.fieldName !== "file" || received || refused) return;
    const ext = file.name.toLowerCase().split(".").pop() ?? "";
    if (!(ALLOWED as readonly string[]).includes(ext)) {
      refused = new UploadError(`Files ending in .${ext || "?"} are not accepted; use CSV, GPX or FIT.`, 415);
      return;
    }
    received = { name: file.name, bytes: new Uint8Array(await file.arrayBuffer()) };
  };
  try {
    await parseFormData(request, { maxFileSize: MAX_UPLOAD_BYTES, maxFiles: 1 }, handler);
  } catch (err) {
    if (err instanceof MaxFileSizeExceededError || err instanceof MaxTotalSizeExceededError) throw new UploadError("That file is larger than 25 MB.", 413);
    if (err instanceof MaxFilesExceededError) throw new UploadError("Send one file at a time.", 400);
    throw new UploadError("The upload could not be read; try again.", 400);
  }
  if (refused) throw refused;
  if (!received) throw new UploadError("Choose a file to upload.", 400);
  const { name, bytes } = received as { name: string; bytes: Uint8Array };
  let activity: Activity;
  try {
    activity = parseActivity(bytes, name);
  } catch (err) {
    if (err instanceof TrainingInputError) throw new UploadError(`This file cannot be used: ${err.message}`, 400);
    throw err;
  }
  const summary = summarize(activity);
  const storageKey = `${athlete.id}/${crypto.randomUUID()}.${activity.meta.format}`;
  await fileStorage().set(storageKey, new File([bytes as BlobPart], name, { type: "application/octet-stream" }));
  try {
    return await writeTransaction((transaction) =>
      Upload.create({ athleteId: athlete.id, uploadedBy: uploadedBy.id, originalName: name.slice(0, 255), format: activity.meta.format, size: bytes.byteLength, storageKey, summary }, { transaction }),
    );
  } catch (err) {
    await fileStorage().remove(storageKey);
    throw err;
  }
}

/** Reads a stored upload back into 1 Hz samples (for windows the user shifts). */
export async function loadActivity(upload: Upload): Promise<Activity> {
  const file = await fileStorage().get(upload.storageKey);
  if (!file) throw new UploadError("The stored file is missing.", 410);
  return parseActivity(new Uint8Array(await file.arrayBuffer()), `x.${upload.format}`);
}

/** A light trace for charts: one point every `step` seconds. */
export function traceOf(activity: Activity, step = 5) {
  const out: { t: number; power: number | null; hr: number | null }[] = [];
  for (let i = 0; i < activity.samples.length; i += step) {
    const s = activity.samples[i];
    out.push({ t: s.t, power: s.power ?? null, hr: s.hr ?? null });
  }
  return out;
}
