import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { chromium, type Browser, type Page } from "playwright-core";
import { expect } from "vitest";

export const CHROMIUM = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
export const SCREENSHOTS = path.resolve("tests/e2e/.screenshots");

/** Under CI a missing browser is a failure; on a laptop without Chromium the browser tests are skipped. */
export function browserAvailable(): boolean {
  if (fs.existsSync(CHROMIUM)) return true;
  if (process.env.CI === "true")
    throw new Error(`Chromium not found at ${CHROMIUM}; CI must install it (apt-get install -y chromium).`);
  console.warn(`[e2e] Chromium not found at ${CHROMIUM}: skipping browser tests.`);
  return false;
}

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
  });
}

export interface RunningApp {
  baseUrl: string;
  dir: string;
  env: Record<string, string>;
  /** The server process, for tests that kill an instance mid-write. */
  child: ChildProcess;
  stop(): Promise<void>;
}

/** Starts the built app exactly as `npm start` does, on free ports, with a fresh database and the local fakes. */
export async function startApp(extraEnv: Record<string, string> = {}): Promise<RunningApp> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-e2e-"));
  const port = await freePort();
  const baseUrl = `http://localhost:${port}`;
  const env = {
    PORT: String(port),
    APP_URL: baseUrl,
    SMTP_CATCHER_PORT: String(await freePort()),
    FAKE_PAYMENTS_PORT: String(await freePort()),
    DATABASE_PATH: path.join(dir, "e2e.sqlite"),
    UPLOAD_DIR: path.join(dir, "uploads"),
    PACEWRIGHT_FAKES: "on",
    NODE_ENV: "production",
    ...extraEnv,
  };
  const child: ChildProcess = spawn(
    process.execPath,
    [path.resolve("node_modules/tsx/dist/cli.mjs"), "scripts/start.ts"],
    {
      env: { ...process.env, ...env },
      stdio: ["ignore", "pipe", "pipe"],
    },
  );
  let log = "";
  child.stdout!.on("data", (d) => (log += d));
  child.stderr!.on("data", (d) => (log += d));
  const deadline = Date.now() + 150_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`app exited early:\n${log}`);
    try {
      const res = await fetch(`${baseUrl}/healthz`);
      if (res.ok) break;
    } catch {
      /* not listening yet */
    }
    if (Date.now() > deadline) {
      child.kill("SIGKILL");
      throw new Error(`app did not start in time:\n${log}`);
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  return {
    baseUrl,
    dir,
    env,
    child,
    stop: async () => {
      if (child.exitCode === null) {
        child.kill("SIGTERM");
        await new Promise((r) => {
          const t = setTimeout(() => {
            child.kill("SIGKILL");
            r(null);
          }, 5000);
          child.once("exit", () => {
            clearTimeout(t);
            r(null);
          });
        });
      }
      if (process.env.E2E_SHOW_LOG === "1") console.log(log);
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--no-first-run",
    ],
  });
}

/** Waits until React has hydrated, so clicks are handled by the app and not by a plain form post. */
export async function ready(page: Page) {
  await page.waitForLoadState("networkidle");
  await page.waitForFunction(
    () => (window as unknown as { __reactRouterRouteModules?: object }).__reactRouterRouteModules !== undefined,
  );
}

export async function shot(page: Page, name: string) {
  fs.mkdirSync(SCREENSHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SCREENSHOTS, `${name}.png`), fullPage: true });
}

/**
 * Opens the newest message to `to` in the dev outbox (the mail sender runs in the background) and returns its link.
 * The app runs as a production build with the demo switch on, where the outbox is for admins: it is read in a
 * separate browser context signed in as the demo admin, so `page` keeps its own session (cookies are untouched).
 */
export async function linkFromOutbox(page: Page, baseUrl: string, to: string, pathPart: string): Promise<string> {
  const context = await page.context().browser()!.newContext();
  try {
    const admin = await context.newPage();
    const { DEMO_ACCOUNTS } = await import("../../db/demo/accounts");
    await signInAs(admin, baseUrl, DEMO_ACCOUNTS.people.find((p) => p.role === "admin")!.email, DEMO_ACCOUNTS.password);
    await admin.waitForURL((url) => !url.pathname.startsWith("/login"));
    const link = admin.locator(`[data-testid=caught-mail] a[href*="${pathPart}"]`).first();
    // The sender delivers in the background: reload the outbox until the message is there (30 s at most).
    await expect
      .poll(
        async () => {
          await admin.goto(`${baseUrl}/dev/mail?to=${encodeURIComponent(to)}`);
          return link.count();
        },
        { timeout: 30_000, interval: 500, message: `no mail with ${pathPart} reached ${to}` },
      )
      .toBeGreaterThan(0);
    const href = (await link.getAttribute("href"))!;
    // `page` shows what the admin saw (a static copy), so a test can go on to read the message there.
    await page.setContent(await admin.content());
    return href;
  } finally {
    await context.close();
  }
}

export async function signInAs(page: Page, baseUrl: string, email: string, password: string) {
  await page.goto(`${baseUrl}/login`);
  await ready(page);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
}

/**
 * Starts the app and a browser once for a describe block and stops both after it. Call inside `describe`;
 * the returned object's fields are filled in by beforeAll.
 */
export function useApp(hooks: {
  beforeAll: (fn: () => Promise<void>) => void;
  afterAll: (fn: () => Promise<void>) => void;
}) {
  const ctx = {} as { app: RunningApp; browser: Browser };
  hooks.beforeAll(async () => {
    ctx.app = await startApp();
    ctx.browser = await launchBrowser();
  });
  hooks.afterAll(async () => {
    await ctx.browser?.close();
    await ctx.app?.stop();
  });
  return ctx;
}

/** Creates an 8-week plan starting the Monday after today (in the browser's reckoning) and opens its board. */
export async function newPlanOnBoard(
  page: Page,
  baseUrl: string,
  name: string,
): Promise<{ planId: string; monday: string }> {
  await page.goto(`${baseUrl}/coach/plans/new`);
  await ready(page);
  await page.getByLabel("Plan name").fill(name);
  await page.getByLabel("a start date").check();
  const monday = await page.evaluate(() => {
    const d = new Date();
    d.setUTCDate(d.getUTCDate() + ((8 - d.getUTCDay()) % 7 || 7));
    return d.toISOString().slice(0, 10);
  });
  await page.getByLabel("Start date", { exact: true }).fill(monday);
  await page.getByLabel("Weeks", { exact: true }).fill("8");
  await page.getByRole("button", { name: "Create the plan" }).click();
  await page.waitForURL(/\/coach\/plans\/\d+$/);
  const planId = page.url().match(/plans\/(\d+)/)![1];
  await page.goto(`${baseUrl}/coach/plans/${planId}/board`);
  await ready(page);
  return { planId, monday };
}

/** Waits until the browser has painted twice: dnd-kit reads positions on animation frames, so a drag step is then seen. */
export async function framesSettled(page: Page) {
  await page.evaluate(
    () => new Promise<void>((resolve) => requestAnimationFrame(() => requestAnimationFrame(() => resolve()))),
  );
}
