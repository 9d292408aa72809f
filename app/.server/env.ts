import path from "node:path";

/**
 * Every setting Pacewright reads from the environment, in one place, so the README table and the code
 * cannot drift apart. Values are read lazily: tests set variables before the first call.
 */
export interface Env {
  nodeEnv: string;
  isProduction: boolean;
  port: number;
  appUrl: string;
  databasePath: string;
  /** postgres://… (or postgres:///db?host=/socket/dir): run on PostgreSQL instead of the SQLite file. */
  databaseUrl: string | null;
  sessionSecret: string;
  smtpUrl: string | null;
  smtpCatcherPort: number;
  mailFrom: string;
  fakes: boolean;
  /** Fakes switched on in a production build: the outbox page is then for admins only. */
  demoInProduction: boolean;
  uploadDir: string;
  stripeSecretKey: string | null;
  stripeWebhookSecret: string;
  fakePaymentsPort: number;
}

let cached: Env | null = null;

export function env(): Env {
  if (cached) return cached;
  const e = process.env;
  const nodeEnv = e.NODE_ENV ?? "development";
  const port = Number(e.PORT ?? 3000);
  const smtpUrl = e.SMTP_URL?.trim() || null;
  // Local fakes (mail catcher, outbox page, fake payment provider) are demo doors. In production they open only
  // with the explicit switch PACEWRIGHT_FAKES=on (`npm start` sets it for the local demo); in development they run
  // unless switched off or real mail is configured.
  const fakesSwitch = e.PACEWRIGHT_FAKES?.trim().toLowerCase();
  const fakes = nodeEnv === "production" ? fakesSwitch === "on" : fakesSwitch ? fakesSwitch !== "off" : !smtpUrl;
  // With fakes on, this is a local demo on http://localhost: no Secure cookies, a built-in secret is fine.
  const isProduction = nodeEnv === "production" && !fakes;
  const sessionSecret = e.SESSION_SECRET ?? "";
  if (isProduction && sessionSecret.length < 32) {
    throw new Error("SESSION_SECRET must be set to at least 32 characters in production.");
  }
  cached = {
    nodeEnv,
    isProduction,
    port,
    appUrl: (e.APP_URL ?? `http://localhost:${port}`).replace(/\/$/, ""),
    databasePath: path.resolve(e.DATABASE_PATH ?? "db/data/pacewright.sqlite"),
    databaseUrl: e.DATABASE_URL?.trim() || null,
    sessionSecret: sessionSecret || "pacewright-local-development-secret-not-for-production",
    smtpUrl,
    smtpCatcherPort: Number(e.SMTP_CATCHER_PORT ?? 2525),
    mailFrom: e.MAIL_FROM ?? "Pacewright <no-reply@pacewright.local>",
    fakes,
    demoInProduction: nodeEnv === "production" && fakes,
    uploadDir: path.resolve(e.UPLOAD_DIR ?? "db/data/uploads"),
    stripeSecretKey: e.STRIPE_SECRET_KEY?.trim() || null,
    stripeWebhookSecret: e.STRIPE_WEBHOOK_SECRET ?? "whsec_pacewright_local_fake",
    fakePaymentsPort: Number(e.FAKE_PAYMENTS_PORT ?? 4243),
  };
  return cached;
}

/** Tests change variables between files; this forgets what was read. */
export function resetEnvCache() {
  cached = null;
}
