import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import type { QueryInterface } from "sequelize";
import { SequelizeStorage, Umzug } from "umzug";
import { db } from "../app/.server/db";

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

/** Brings the schema up to date, then applies every demo seeder that has not run yet (each runs once). */
export async function migrateAndSeed({ seed = true }: { seed?: boolean } = {}) {
  await migrator().up();
  if (seed) await seeder().up();
}
