import crypto from "node:crypto";
import { writeTransaction } from "../db";
import { Upload, type User } from "../models";
import { fileStorage } from "../storage";
import type { Activity } from "~/lib/training";
import { readActivityOffThread } from "./activity-pool";
import { DomainError } from "../errors";

export const MAX_UPLOAD_BYTES = 25 * 1024 * 1024;
export const ALLOWED = ["csv", "gpx", "fit"] as const;

export type { UploadSummary, TracePoint } from "../workers/activity-task";
export { activityHistograms } from "../workers/activity-task";

/**
 * Stores one ride file the route has read from its request: the engine must be able to read it (400 with its
 * reason), and only then is it stored and recorded. A file that fails leaves nothing behind.
 */
export async function storeUpload(
  { name, bytes }: { name: string; bytes: Uint8Array },
  athlete: User,
  uploadedBy: User,
) {
  // Parsed on a worker thread: a big file must not hold up everyone else's requests.
  const read = await readActivityOffThread({ bytes, name, want: "summary" }, uploadedBy.id);
  const { summary, trace } = read;
  const storageKey = `${athlete.id}/${crypto.randomUUID()}.${summary.format}`;
  await fileStorage().set(storageKey, new File([bytes as BlobPart], name, { type: "application/octet-stream" }));
  try {
    const upload = await writeTransaction((transaction) =>
      Upload.create(
        {
          athleteId: athlete.id,
          uploadedBy: uploadedBy.id,
          originalName: name.slice(0, 255),
          format: summary.format,
          size: bytes.byteLength,
          storageKey,
          summary,
        },
        { transaction },
      ),
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
  if (!file) throw new DomainError("gone", "The stored file is missing.");
  return readActivityOffThread(
    { bytes: new Uint8Array(await file.arrayBuffer()), name: `x.${upload.format}`, want },
    upload.athleteId,
  );
}

export { traceOf } from "../workers/activity-task";
