import { AsyncLocalStorage } from "node:async_hooks";
import fs from "node:fs";
import path from "node:path";
import { Sequelize, Transaction, type Options } from "sequelize";
import { env } from "./env";

declare global {
  // One instance per process, also across dev-server reloads.
  var __pacewrightDb: Sequelize | undefined;
}

function createSequelize(): Sequelize {
  const file = env().databasePath;
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const sequelize = new Sequelize({
    dialect: "sqlite",
    storage: file,
    logging: process.env.SQL_LOG === "1" ? console.log : false,
    // Sequelize turns PRAGMA foreign_keys on for each connection it opens.
    foreignKeys: true,
    define: { underscored: true, timestamps: true },
  } as Options);
  // Sequelize's SQLite dialect opens one connection per transaction and fires no connect hooks, so each new
  // connection is configured here: readers never block the writer in WAL mode, and the busy timeout makes
  // concurrent writers queue instead of failing.
  const manager = sequelize.connectionManager as unknown as {
    getConnection(options?: object): Promise<import("sqlite3").Database>;
  };
  const open = manager.getConnection.bind(manager);
  const ready = new WeakSet<object>();
  manager.getConnection = async (options) => {
    const connection = await open(options);
    if (!ready.has(connection)) {
      ready.add(connection);
      connection.configure("busyTimeout", 10_000);
      await new Promise<void>((resolve, reject) =>
        connection.exec("PRAGMA journal_mode = WAL; PRAGMA synchronous = NORMAL; PRAGMA foreign_keys = ON;", (err) =>
          err ? reject(err) : resolve(),
        ),
      );
    }
    return connection;
  };
  return sequelize;
}

export function db(): Sequelize {
  globalThis.__pacewrightDb ??= createSequelize();
  return globalThis.__pacewrightDb;
}

const inWrite = new AsyncLocalStorage<true>();
let writeQueue: Promise<unknown> = Promise.resolve();

/**
 * Runs `fn` in one write transaction. IMMEDIATE takes SQLite's write lock at BEGIN, so a read lock is never
 * upgraded mid-transaction (which deadlocks). Writers in this process also queue here first: node-sqlite3 runs
 * statements on libuv's small thread pool, and writers parked in SQLite's busy wait would take every thread,
 * leaving none for the transaction that holds the lock to commit.
 */
export function writeTransaction<T>(fn: (t: Transaction) => Promise<T>): Promise<T> {
  if (inWrite.getStore()) {
    return Promise.reject(new Error("writeTransaction was called inside another one; pass the outer transaction down instead."));
  }
  const run = () => inWrite.run(true, () => db().transaction({ type: Transaction.TYPES.IMMEDIATE }, fn));
  const result = writeQueue.then(run, run);
  writeQueue = result.catch(() => undefined);
  return result;
}

export async function closeDb() {
  if (globalThis.__pacewrightDb) {
    await globalThis.__pacewrightDb.close();
    globalThis.__pacewrightDb = undefined;
  }
}

/** The text form Sequelize stores DATE columns in on SQLite, for raw SQL that must compare with them. */
export function sqlDate(d: Date): string {
  return d.toISOString().replace("T", " ").replace("Z", " +00:00");
}
