import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import type { QueryInterface } from "sequelize";
import { SequelizeStorage, Umzug } from "umzug";
import { db } from "../app/.server/db";
import { env } from "../app/.server/env";

type Step = (params: { context: QueryInterface }) => Promise<void>;

const here = path.dirname(fileURLToPath(import.meta.url));

function umzugFor(folder: "migrations" | "seeders", tableName: string) {
  const sequelize = db();
  return new Umzug<QueryInterface>({
    migrations: {
      glob: [`${folder}/*.ts`, { cwd: here }],
      resolve: ({ name, path: file, context }) => {
        const load = async () => (await import(pathToFileURL(file!).href)) as { up: Step; down?: Step };
        return {
          name: name.replace(/\.ts$/, ""),
          up: async () => (await load()).up({ context }),
          down: async () => {
            const mod = await load();
            if (!mod.down) throw new Error(`${name} cannot be rolled back`);
            return mod.down({ context });
          },
        };
      },
    },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName }),
    logger: process.env.MIGRATE_QUIET === "1" ? undefined : console,
  });
}

export const migrator = () => umzugFor("migrations", "schema_migrations");
export const seeder = () => umzugFor("seeders", "schema_seeds");

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
    await migrator().up();
    if (seed) await seeder().up();
  });
}
