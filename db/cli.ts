import { closeDb } from "../app/.server/db";
import { migrator, seeder, withMigrationLock } from "./migrator";

const [command, arg] = process.argv.slice(2);

async function main() {
  switch (command) {
    case "up":
      await withMigrationLock(() => migrator().up());
      break;
    case "down":
      // One step back by default; `down all` undoes every migration.
      await migrator().down(arg === "all" ? { to: 0 } : undefined);
      break;
    case "seed":
      await withMigrationLock(async () => {
        await migrator().up();
        await seeder().up();
      });
      break;
    case "status": {
      const pending = await migrator().pending();
      const executed = await migrator().executed();
      console.log({ executed: executed.map((m) => m.name), pending: pending.map((m) => m.name) });
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
