import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll } from "vitest";

// Every test file gets its own SQLite file, built by the real migrations.
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-it-"));
process.env.DATABASE_PATH = path.join(dir, "test.sqlite");
process.env.UPLOAD_DIR = path.join(dir, "uploads");
process.env.APP_URL = "http://localhost:3999";
process.env.PACEWRIGHT_FAKES = "on";
process.env.MIGRATE_QUIET = "1";
process.env.NODE_ENV = "test";

beforeAll(async () => {
  const { migrator } = await import("../../db/migrator");
  await migrator().up();
});

afterAll(async () => {
  const { closeActivityPool } = await import("../../app/.server/services/activity-pool");
  await closeActivityPool();
  const { closeDb } = await import("../../app/.server/db");
  await closeDb();
  fs.rmSync(dir, { recursive: true, force: true });
});
