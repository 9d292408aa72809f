import { closeDb } from "../app/.server/db";
import { migrateAndSeed, migrator, moveSeederRecords, rollback, seeder, withMigrationLock } from "./migrator";

const [command, arg] = process.argv.slice(2);

async function main() {
  switch (command) {
    case "up":
      await migrateAndSeed({ seed: false });
      break;
    case "down":
      // One step back by default; `down all` undoes every migration (and forgets the seeders).
      if (arg !== undefined && arg !== "all") {
        console.error(`usage: tsx db/cli.ts down [all] (got "${arg}")`);
        process.exitCode = 2;
        break;
      }
      await withMigrationLock(() => rollback(arg === "all" ? { to: 0 } : undefined));
      break;
    case "seed":
      await migrateAndSeed();
      break;
    case "status": {
      await moveSeederRecords();
      const names = (list: { name: string }[]) => list.map((m) => m.name);
      console.log({
        executed: names(await migrator().executed()),
        pending: names(await migrator().pending()),
        seeded: names(await seeder().executed()),
      });
      break;
    }
    default:
      console.error("usage: tsx db/cli.ts up | down [all] | seed | status");
      process.exitCode = 2;
  }
  await closeDb();
}

main().catch(async (err) => {
  console.error(err);
  await closeDb();
  process.exit(1);
});
