import crypto from "node:crypto";
import { MaxFileSizeExceededError, MaxFilesExceededError, MaxTotalSizeExceededError, parseFormData, type FileUpload } from "@remix-run/form-data-parser";
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
 * Takes one file from a multipart request: size and type are enforced while it streams (413 / 415), the engine
 * must be able to read it (400 with its reason), and only then is it stored and recorded. A file that fails any
 * check leaves nothing behind.
 */
export async function receiveUpload(request: Request, athlete: User, uploadedBy: User) {
  const type = request.headers.get("content-type") ?? "";
  if (!type.startsWith("multipart/form-data")) throw new DomainError("unsupported", "Send the file as multipart/form-data.");
  const declared = Number(request.headers.get("content-length") ?? 0);
  if (declared > MAX_UPLOAD_BYTES + 64 * 1024) throw new DomainError("too_large", "That file is larger than 25 MB.");
  let received: { name: string; bytes: Uint8Array } | null = null;
  let refused: DomainError | null = null;
  const handler = async (file: FileUpload) => {
    if (file.fieldName !== "file" || received || refused) return;
    const ext = file.name.toLowerCase().split(".").pop() ?? "";
    if (!(ALLOWED as readonly string[]).includes(ext)) {
      refused = new DomainError("unsupported", `Files ending in .${ext || "?"} are not accepted; use CSV, GPX or FIT.`);
      return;
    }
    received = { name: file.name, bytes: new Uint8Array(await file.arrayBuffer()) };
  };
  try {
    await parseFormData(request, { maxFileSize: MAX_UPLOAD_BYTES, maxFiles: 1 }, handler);
  } catch (err) {
    if (err instanceof MaxFileSizeExceededError || err instanceof MaxTotalSizeExceededError) throw new DomainError("too_large", "That file is larger than 25 MB.");
    if (err instanceof MaxFilesExceededError) throw new DomainError("invalid", "Send one file at a time.");
    throw new DomainError("invalid", "The upload could not be read; try again.");
  }
  if (refused) throw refused;
  if (!received) throw new DomainError("invalid", "Choose a file to upload.");
  const { name, bytes } = received as { name: string; bytes: Uint8Array };
  // Parsed on a worker thread: a big file must not hold up everyone else's requests.
  const read = await readActivityOffThread({ bytes, name, want: "summary" }, uploadedBy.id);
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
  if (!file) throw new DomainError("gone", "The stored file is missing.");
  return readActivityOffThread({ bytes: new Uint8Array(await file.arrayBuffer()), name: `x.${upload.format}`, want }, upload.athleteId);
}

export { traceOf } from "../workers/activity-task";
