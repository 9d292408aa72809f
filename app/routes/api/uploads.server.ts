import {
  MaxFileSizeExceededError,
  MaxFilesExceededError,
  MaxTotalSizeExceededError,
  parseFormData,
  type FileUpload,
} from "@remix-run/form-data-parser";
import { DomainError } from "~/.server/errors";
import { ALLOWED, MAX_UPLOAD_BYTES } from "~/.server/services/uploads";

/**
 * Takes one file (field "file") from a multipart request: size and type are enforced while it streams (413 / 415),
 * before anything is stored. The service (`storeUpload`) then reads and records it.
 */
export async function readUploadBody(request: Request): Promise<{ name: string; bytes: Uint8Array }> {
  const type = request.headers.get("content-type") ?? "";
  if (!type.startsWith("multipart/form-data"))
    throw new DomainError("unsupported", "Send the file as multipart/form-data.");
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
    if (err instanceof MaxFileSizeExceededError || err instanceof MaxTotalSizeExceededError)
      throw new DomainError("too_large", "That file is larger than 25 MB.");
    if (err instanceof MaxFilesExceededError) throw new DomainError("invalid", "Send one file at a time.");
    throw new DomainError("invalid", "The upload could not be read; try again.");
  }
  if (refused) throw refused;
  if (!received) throw new DomainError("invalid", "Choose a file to upload.");
  return received;
}
