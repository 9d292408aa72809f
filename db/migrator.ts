import fs from "node:fs";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { QueryTypes, type QueryInterface, type Sequelize, type Transaction } from "sequelize";
import { SequelizeStorage, Umzug } from "umzug";
import { db, dialect, withForeignKeysOff } from "../app/.server/db";
import { env } from "../app/.server/env";

type Step = (params: { context: QueryInterface }) => Promise<void>;

const here = path.dirname(fileURLToPath(import.meta.url));

const MIGRATIONS_TABLE = "schema_migrations";
const SEEDS_TABLE = "schema_seeds";

/**
 * The query interface with every statement joined to `transaction`. Migrations call `qi.addColumn(…)` without
 * options; Query Interface methods all end in `this.sequelize.query`, so handing them a `sequelize` that fills in
 * the transaction puts the whole step in it.
 */
function inTransaction(qi: QueryInterface, transaction: Transaction): QueryInterface {
  const sequelize = new Proxy(qi.sequelize, {
    get(target, prop) {
      if (prop === "query") {
        return (sql: unknown, options?: { transaction?: Transaction | null }) =>
          target.query(sql as string, { ...options, transaction: options?.transaction ?? transaction });
      }
      const value = Reflect.get(target, prop, target) as unknown;
      return typeof value === "function" ? value.bind(target) : value;
    },
  });
  return new Proxy(qi, {
    get: (target, prop, receiver) => (prop === "sequelize" ? sequelize : Reflect.get(target, prop, receiver)),
  });
}

/**
 * Undoes one migration and forgets it in one transaction, so a failing step leaves the database as it was. On
 * SQLite foreign keys are off for that transaction (see withForeignKeysOff) and checked before it commits.
 */
export async function downInTransaction(sequelize: Sequelize, name: string, down: Step) {
  await withForeignKeysOff(() =>
    sequelize.transaction(async (transaction) => {
      await down({ context: inTransaction(sequelize.getQueryInterface(), transaction) });
      if (dialect() === "sqlite") {
        const broken = await sequelize.query<{ table: string; parent: string }>("PRAGMA foreign_key_check", {
          type: QueryTypes.SELECT,
          transaction,
        });
        if (broken.length) {
          throw new Error(
            `${name}: rolling back would leave rows in ${broken[0].table} pointing at missing ${broken[0].parent} rows`,
          );
        }
      }
      await sequelize.query(`DELETE FROM ${MIGRATIONS_TABLE} WHERE name = ?`, { replacements: [name], transaction });
    }),
  );
}

function umzugFor(folder: "migrations" | "seeders") {
  const sequelize = db();
  return new Umzug<QueryInterface>({
    migrations: {
      glob: [`${folder}/*.ts`, { cwd: here }],
      resolve: ({ name, path: file, context }) => {
        const load = async () => (await import(pathToFileURL(file!).href)) as { up: Step; down?: Step };
        const step = name.replace(/\.ts$/, "");
        return {
          name: step,
          up: async () => (await load()).up({ context }),
          down: async () => {
            const mod = await load();
            if (!mod.down) throw new Error(`${name} cannot be rolled back`);
            // Seeders run the app's own services, which open their own transactions.
            if (folder === "seeders") return mod.down({ context });
            return downInTransaction(sequelize, step, mod.down);
          },
        };
      },
    },
    context: sequelize.getQueryInterface(),
    // Each storage needs a model name of its own: SequelizeStorage reuses a model already defined under its name,
    // whatever its table, and both once defaulted to "SequelizeMeta" (seeders then landed in schema_migrations).
    storage: new SequelizeStorage({
      sequelize,
      tableName: folder === "migrations" ? MIGRATIONS_TABLE : SEEDS_TABLE,
      modelName: folder === "migrations" ? "SchemaMigration" : "SchemaSeed",
    }),
    logger: process.env.MIGRATE_QUIET === "1" ? undefined : console,
  });
}

export const migrator = () => umzugFor("migrations");
export const seeder = () => umzugFor("seeders");

const seederNames = () =>
  fs
    .readdirSync(path.join(here, "seeders"))
    .filter((f) => f.endsWith(".ts"))
    .map((f) => f.replace(/\.ts$/, ""));

/**
 * Databases seeded before seeders had a table of their own have the seeders' names in schema_migrations: move them
 * to schema_seeds (idempotent; a no-op on a fresh or already moved database).
 */
export async function moveSeederRecords() {
  const sequelize = db();
  const tables = (await sequelize.getQueryInterface().showAllTables()).map((t) =>
    typeof t === "string" ? t : (t as { tableName: string }).tableName,
  );
  if (!tables.includes(MIGRATIONS_TABLE)) return;
  const names = seederNames();
  const misplaced = (
    await sequelize.query<{ name: string }>(`SELECT name FROM ${MIGRATIONS_TABLE} WHERE name IN (?)`, {
      replacements: [names],
      type: QueryTypes.SELECT,
    })
  ).map((r) => r.name);
  if (!misplaced.length) return;
  const seeds = seeder();
  await seeds.executed(); // creates schema_seeds when missing
  await sequelize.transaction(async (transaction) => {
    const recorded = new Set(
      (
        await sequelize.query<{ name: string }>(`SELECT name FROM ${SEEDS_TABLE}`, {
          type: QueryTypes.SELECT,
          transaction,
        })
      ).map((r) => r.name),
    );
    for (const name of misplaced.filter((n) => !recorded.has(n))) {
      await sequelize.query(`INSERT INTO ${SEEDS_TABLE} (name) VALUES (?)`, { replacements: [name], transaction });
    }
    await sequelize.query(`DELETE FROM ${MIGRATIONS_TABLE} WHERE name IN (?)`, {
      replacements: [misplaced],
      transaction,
    });
  });
}

/**
 * Rolls back one migration, or every one with `{ to: 0 }`. With no migration left the demo rows are gone with
 * their tables, so the seeders are forgotten too and the next seed puts the demo data back.
 */
export async function rollback(options?: { to: 0 }) {
  await moveSeederRecords();
  const migrations = migrator();
  await migrations.down(options);
  if ((await migrations.executed()).length === 0) {
    await db().getQueryInterface().dropTable(SEEDS_TABLE);
  }
}

/**
 * Runs `fn` holding a PostgreSQL advisory lock on a connection of its own, so instances that start together
 * migrate one after the other (the later ones find nothing pending). SQLite has one process per file.
 */
export async function withMigrationLock<T>(fn: () => Promise<T>): Promise<T> {
  const url = env().databaseUrl;
  if (!url) return fn();
  const { default: pg } = await import("pg");
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    await client.query("SELECT pg_advisory_lock(7201820)");
    return await fn();
  } finally {
    await client.query("SELECT pg_advisory_unlock(7201820)").catch(() => undefined);
    await client.end();
  }
}

/** Brings the schema up to date, then applies every demo seeder that has not run yet (each runs once). */
export async function migrateAndSeed({ seed = true }: { seed?: boolean } = {}) {
  await withMigrationLock(async () => {
    await moveSeederRecords();
    await migrator().up();
    if (seed) await seeder().up();
  });
}
