import crypto from "node:crypto";
import { MaxFileSizeExceededError, MaxFilesExceededError, MaxTotalSizeExceededError, parseFormData, type FileUpload } from "@remix-run/form-data-parser";
import { writeTransaction } from "../db";
import { Upload, type User } from "../models";
import { fileStorage } from "../storage";
import type { Activity } from "~/lib/training";
import { ActivityReadError, readActivityOffThread } from "./activity-pool";

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

export type { UploadSummary, TracePoint } from "../workers/activity-task";
export { activityHistograms } from "../workers/activity-task";

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
  // Parsed on a worker thread: a big file must not hold up everyone else's requests.
  let read;
  try {
    read = await readActivityOffThread({ bytes, name, want: "summary" }, uploadedBy.id);
  } catch (err) {
    if (err instanceof ActivityReadError) throw new UploadError(err.message, err.status);
    throw err;
  }
  const { summary, trace } = read;
  const storageKey = `${athlete.id}/${crypto.randomUUID()}.${summary.format}`;
  await fileStorage().set(storageKey, new File([bytes as BlobPart], name, { type: "application/octet-stream" }));
  try {
    const upload = await writeTransaction((transaction) =>
      Upload.create({ athleteId: athlete.id, uploadedBy: uploadedBy.id, originalName: name.slice(0, 255), format: summary.format, size: bytes.byteLength, storageKey, summary }, { transaction }),
    );
    return { upload, trace };
  } catch (err) {
    await fileStorage().remove(storageKey);
    throw err;
  }
}

/** Reads a stored upload back into 1 Hz samples (for windows the user shifts), on a worker thread. */
export async function loadActivity(upload: Upload): Promise<Activity> {
  return (await readStored(upload, "activity")).activity!;
}

/** The light chart trace of a stored upload. */
export async function storedTrace(upload: Upload) {
  return (await readStored(upload, "summary")).trace;
}

async function readStored(upload: Upload, want: "summary" | "activity") {
  const file = await fileStorage().get(upload.storageKey);
  if (!file) throw new UploadError("The stored file is missing.", 410);
  try {
    return await readActivityOffThread({ bytes: new Uint8Array(await file.arrayBuffer()), name: `x.${upload.format}`, want }, upload.athleteId);
  } catch (err) {
    if (err instanceof ActivityReadError) throw new UploadError(err.message, err.status);
    throw err;
  }
}

export { traceOf } from "../workers/activity-task";
