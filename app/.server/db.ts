import { AsyncLocalStorage } from "node:async_hooks";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { Sequelize, Transaction, type Options } from "sequelize";
import { env } from "./env";

export type Dialect = "sqlite" | "postgres";

/** Which database this process runs on: PostgreSQL when DATABASE_URL is set, else the SQLite file. */
export function dialect(): Dialect {
  return env().databaseUrl ? "postgres" : "sqlite";
}

declare global {
  // One instance per process, also across dev-server reloads.
  var __pacewrightDb: Sequelize | undefined;
}

// COUNT(*) and SUM over integers come back as int8, which pg leaves as strings; every count here fits a double.
pg.types.setTypeParser(pg.types.builtins.INT8, (v) => Number(v));

function createPostgres(url: string): Sequelize {
  return new Sequelize(url, {
    dialect: "postgres",
    dialectModule: pg,
    logging: process.env.SQL_LOG === "1" ? console.log : false,
    define: { underscored: true, timestamps: true },
    pool: { max: Number(process.env.DATABASE_POOL_MAX ?? 10), min: 0, idle: 10_000, acquire: 30_000 },
  } as Options);
}

function createSequelize(): Sequelize {
  const url = env().databaseUrl;
  if (url) return createPostgres(url);
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
    // A transaction opened inside withForeignKeysOff gets a connection of its own (Sequelize opens one per
    // transaction and closes it after), so switching enforcement off here, before BEGIN, touches no other query.
    if (foreignKeysOff.getStore() && (options as { uuid?: string } | undefined)?.uuid) {
      await new Promise<void>((resolve, reject) =>
        connection.exec("PRAGMA foreign_keys = OFF;", (err) => (err ? reject(err) : resolve())),
      );
    }
    return connection;
  };
  return sequelize;
}

const foreignKeysOff = new AsyncLocalStorage<true>();

/**
 * SQLite rebuilds a table to drop a column, and dropping a parent table with foreign keys enforced fails (or
 * cascades its children away). SQLite's own recipe: enforcement off on the connection (PRAGMA foreign_keys cannot
 * change inside a transaction), one transaction, `PRAGMA foreign_key_check` before COMMIT. Transactions opened in
 * `fn` run that way; PostgreSQL is unaffected.
 */
export function withForeignKeysOff<T>(fn: () => Promise<T>): Promise<T> {
  return foreignKeysOff.run(true, fn);
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
    return Promise.reject(
      new Error("writeTransaction was called inside another one; pass the outer transaction down instead."),
    );
  }
  if (dialect() === "postgres") {
    // PostgreSQL serialises conflicting writers itself, across every instance: row locks (see lockRow) and the
    // version checks decide, not this process's order of arrival.
    return inWrite.run(true, () => db().transaction(fn));
  }
  const run = () => inWrite.run(true, () => db().transaction({ type: Transaction.TYPES.IMMEDIATE }, fn));
  const result = writeQueue.then(run, run);
  writeQueue = result.catch(() => undefined);
  return result;
}

/**
 * Runs one statement that is atomic on its own (an upsert, a single-row delete) outside any transaction, still in
 * this process's writer queue on SQLite so it never sits in the busy wait against a writeTransaction of ours. A
 * transaction there costs a connection of its own plus BEGIN and COMMIT; a rate-limit check on every feed poll
 * paid more for that than for its statement.
 */
export function writeStatement<T>(fn: () => Promise<T>): Promise<T> {
  if (inWrite.getStore()) {
    return Promise.reject(new Error("writeStatement was called inside a writeTransaction; use its transaction."));
  }
  if (dialect() === "postgres") return fn();
  const run = () => inWrite.run(true, fn);
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

/**
 * The text form Sequelize stores DATE columns in on SQLite, for raw SQL that must compare with them. PostgreSQL
 * reads the same text as a timestamptz literal, so the value binds on both.
 */
export function sqlDate(d: Date): string {
  return d.toISOString().replace("T", " ").replace("Z", " +00:00");
}

/**
 * Locks one row until the transaction ends (SELECT … FOR UPDATE on PostgreSQL), so writers to the same plan, athlete
 * or order take turns across every app instance. On SQLite a write transaction already holds the one write lock.
 */
export async function lockRow(table: "users" | "season_plans" | "orders", id: number, transaction: Transaction) {
  if (dialect() !== "postgres") return;
  await db().query(`SELECT id FROM ${table} WHERE id = ? FOR UPDATE`, { replacements: [id], transaction });
}
