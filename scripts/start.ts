import type { Server } from "node:http";
import { closeDb } from "../app/.server/db";
import { closeActivityPool } from "../app/.server/services/activity-pool";
import { startLimitCleanup } from "../app/.server/security/rate-limits";
import { env, resetEnvCache } from "../app/.server/env";
import { startFakes } from "../app/.server/fakes";
import { startJobRunner, stopJobRunner } from "../app/.server/jobs";
import { startMailer, stopMailer } from "../app/.server/mail";
import { ORDER_FOLLOW_UPS } from "../app/.server/services/order-follow-ups";
import { startRetestReminders, stopRetestReminders } from "../app/.server/services/retests";
import { migrateAndSeed } from "../db/migrator";
import { DEMO_ACCOUNTS } from "../db/demo/accounts";
import { buildIfNeeded } from "./build-if-needed";

const dev = process.argv.includes("--dev");
const verbose = process.argv.includes("--verbose");
process.env.NODE_ENV ??= dev ? "development" : "production";
// `npm start` is the local demo: it turns the fakes on explicitly. `npm run serve` leaves them off.
if (process.argv.includes("--demo")) process.env.PACEWRIGHT_FAKES ??= "on";
process.env.MIGRATE_QUIET ??= "1";

async function main() {
  // Some imports read the environment while loading, before the lines above ran: read it again now.
  resetEnvCache();
  const e = env();
  // Demo accounts share a published password: they are seeded only where the demo doors are open.
  const seed = process.env.PACEWRIGHT_SEED ? process.env.PACEWRIGHT_SEED !== "off" : e.fakes;
  // With several instances, one release step runs `npm run db:migrate` and the instances start with
  // PACEWRIGHT_MIGRATE=off; if they do migrate, an advisory lock on PostgreSQL lets one at a time do it.
  if (process.env.PACEWRIGHT_MIGRATE !== "off") await migrateAndSeed({ seed });
  const fakes = await startFakes();
  startMailer();
  startJobRunner(ORDER_FOLLOW_UPS);
  startRetestReminders();
  startLimitCleanup();

  let server: Server;
  const host = process.env.HOST ?? "127.0.0.1";
  if (dev) {
    const { createDevServer } = await import("./dev-server");
    server = (await createDevServer()).listen(e.port, host);
  } else {
    buildIfNeeded({ verbose });
    const { createAppServer } = await import("./server");
    server = (await createAppServer()).listen(e.port, host);
  }
  await new Promise<void>((resolve, reject) => {
    server.once("listening", resolve);
    server.once("error", reject);
  });

  console.log(`Pacewright is running at ${e.appUrl}`);
  if (fakes.smtpPort)
    console.log(
      `  Mail goes to the local catcher: ${e.appUrl}/dev/mail${e.demoInProduction ? " (sign in as an admin to read it)" : ""}`,
    );
  if (!e.fakes) console.log("  Demo fakes are off (set PACEWRIGHT_FAKES=on for the local demo).");
  if (seed) {
    console.log("  Demo sign-ins (password for all: " + DEMO_ACCOUNTS.password + "):");
    for (const a of DEMO_ACCOUNTS.people) console.log(`    ${a.role.padEnd(8)} ${a.email.padEnd(30)} ${a.name}`);
  }

  // Graceful: stop taking requests, let those in flight finish, stop the background jobs after their current run
  // (claimed e-mail is sent and marked, a claimed follow-up commits or rolls back), then close the database. A load balancer sees /healthz fail meanwhile.
  const stop = async () => {
    const closed = new Promise<void>((resolve) => server.close(() => resolve()));
    server.closeIdleConnections?.();
    stopRetestReminders();
    await Promise.race([closed, new Promise((r) => setTimeout(r, 10_000))]);
    await stopJobRunner();
    await stopMailer();
    await fakes.close();
    await closeActivityPool();
    await closeDb();
    process.exit(0);
  };
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}

/** A port someone else holds gets one line naming the variable that moves it, not a stack trace. */
function portInUse(err: unknown): string | null {
  const e = err as NodeJS.ErrnoException & { port?: number };
  if (e?.code !== "EADDRINUSE") return null;
  const settings = env();
  const variable =
    e.port === settings.smtpCatcherPort
      ? "SMTP_CATCHER_PORT"
      : e.port === settings.fakePaymentsPort
        ? "FAKE_PAYMENTS_PORT"
        : "PORT";
  return `Port ${e.port} is already in use: stop what holds it, or set ${variable} to another port (e.g. ${variable}=${(e.port ?? 3000) + 10} npm start).`;
}

main().catch((err) => {
  console.error(portInUse(err) ?? err);
  process.exit(1);
});
