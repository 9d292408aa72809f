import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll } from "vitest";

// Every test file gets its own database, built by the real migrations: a SQLite file by default, or, with
// TEST_DATABASE_URL set (any database on the server, used only to create and drop others), a fresh PostgreSQL
// database of its own.
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-it-"));
process.env.DATABASE_PATH = path.join(dir, "test.sqlite");
process.env.UPLOAD_DIR = path.join(dir, "uploads");
process.env.APP_URL = "http://localhost:3999";
process.env.PACEWRIGHT_FAKES = "on";
process.env.MIGRATE_QUIET = "1";
process.env.NODE_ENV = "test";

const adminUrl = process.env.TEST_DATABASE_URL?.trim() || null;
const pgName = `pw_it_${process.pid}_${Math.random().toString(36).slice(2, 8)}`;
if (adminUrl) {
  const url = new URL(adminUrl);
  url.pathname = `/${pgName}`;
  process.env.DATABASE_URL = url.toString();
} else {
  delete process.env.DATABASE_URL;
}

async function admin(sql: string) {
  const { default: pg } = await import("pg");
  const client = new pg.Client({ connectionString: adminUrl! });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}

beforeAll(async () => {
  if (adminUrl) await admin(`CREATE DATABASE ${pgName} TEMPLATE template0 ENCODING 'UTF8'`);
  const { migrator } = await import("../../db/migrator");
  await migrator().up();
});

afterAll(async () => {
  const { closeActivityPool } = await import("../../app/.server/services/activity-pool");
  await closeActivityPool();
  const { closeDb } = await import("../../app/.server/db");
  await closeDb();
  if (adminUrl) await admin(`DROP DATABASE IF EXISTS ${pgName} WITH (FORCE)`);
  fs.rmSync(dir, { recursive: true, force: true });
});
