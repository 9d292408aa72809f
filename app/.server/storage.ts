import { createFsFileStorage } from "@remix-run/file-storage/fs";
import type { FileStorage } from "@remix-run/file-storage";
import { env } from "./env";

declare global {
  var __pacewrightStorage: { dir: string; storage: FileStorage } | undefined;
}

/** Uploaded files live in UPLOAD_DIR behind the file-storage interface, so another backend can replace it. */
export function fileStorage(): FileStorage {
  const dir = env().uploadDir;
  if (globalThis.__pacewrightStorage?.dir !== dir)
    globalThis.__pacewrightStorage = { dir, storage: createFsFileStorage(dir) };
  return globalThis.__pacewrightStorage.storage;
}
