import { afterEach, describe, expect, it } from "vitest";
import { env, resetEnvCache } from "~/.server/env";
import { startFakes } from "~/.server/fakes";
import { payments, PaymentsNotConfigured } from "~/.server/payments";
import * as devMail from "~/routes/dev/mail";
import * as layout from "~/routes/app-layout";
import { getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const saved = { ...process.env };
function configure(vars: Record<string, string | undefined>) {
  for (const [k, v] of Object.entries(vars)) {
    if (v === undefined) delete process.env[k];
    else process.env[k] = v;
  }
  resetEnvCache();
}
afterEach(() => {
  process.env = { ...saved };
  resetEnvCache();
});

const production = {
  NODE_ENV: "production",
  SMTP_URL: undefined,
  STRIPE_SECRET_KEY: undefined,
  SESSION_SECRET: "s".repeat(40),
  PACEWRIGHT_FAKES: undefined,
};

describe("demo doors", () => {
  it("a production config without SMTP has no outbox route and no fake payment provider", async () => {
    configure(production);
    expect(env().fakes).toBe(false);
    const admin = await makeUser({ role: "admin" });
    const cookie = await signIn(admin.email);
    expect(statusOf(await run(devMail.loader, getRequest("/dev/mail")))).toBe(404);
    expect(statusOf(await run(devMail.loader, getRequest("/dev/mail", cookie)))).toBe(404);
    const fakes = await startFakes();
    try {
      expect(fakes.smtpPort).toBeNull();
      expect(fakes.paymentsPort).toBeNull();
    } finally {
      await fakes.close();
    }
    expect(() => payments()).toThrow(PaymentsNotConfigured);
    expect(payloadOf(await run(layout.loader, getRequest("/admin/users", cookie))).devMail).toBe(false);
  });

  it("any switch value but 'on' keeps them closed in production", async () => {
    for (const value of ["", "yes", "1", "off"]) {
      configure({ ...production, PACEWRIGHT_FAKES: value });
      expect(env().fakes).toBe(false);
    }
  });

  it("with the demo switch on in production, the outbox is for admins only and says so", async () => {
    configure({ ...production, PACEWRIGHT_FAKES: "on" });
    const athlete = await makeUser({ role: "athlete" });
    const coach = await makeUser({ role: "coach" });
    const admin = await makeUser({ role: "admin" });
    const anonymous = await run(devMail.loader, getRequest("/dev/mail"));
    expect(statusOf(anonymous)).toBe(302);
    expect((anonymous as Response).headers.get("location")).toMatch(/^\/login/);
    expect(statusOf(await run(devMail.loader, getRequest("/dev/mail", await signIn(athlete.email))))).toBe(403);
    expect(statusOf(await run(devMail.loader, getRequest("/dev/mail", await signIn(coach.email))))).toBe(403);
    const adminCookie = await signIn(admin.email);
    const page = await run(devMail.loader, getRequest("/dev/mail", adminCookie));
    expect(statusOf(page)).toBe(200);
    expect(payloadOf(page).adminsOnly).toBe(true);
    // The shell links to it for admins only.
    expect(payloadOf(await run(layout.loader, getRequest("/admin/users", adminCookie))).devMail).toBe(true);
    expect(payloadOf(await run(layout.loader, getRequest("/coach", await signIn(coach.email)))).devMail).toBe(false);
  });

  it("in development the fakes run unless real mail is configured", async () => {
    configure({ NODE_ENV: "development", SMTP_URL: undefined, PACEWRIGHT_FAKES: undefined });
    expect(env().fakes).toBe(true);
    expect(payloadOf(await run(devMail.loader, getRequest("/dev/mail"))).adminsOnly).toBe(false);
    configure({ NODE_ENV: "development", SMTP_URL: "smtp://mail.example.test:25", PACEWRIGHT_FAKES: undefined });
    expect(env().fakes).toBe(false);
  });
});

describe("session cookie", () => {
  it("is Secure whenever the public URL is https, also with the demo switch on, and not on a plain-http local run", async () => {
    const user = await makeUser();
    const { action } = await import("~/routes/login");
    const { formRequest } = await import("./helpers");
    const setCookie = async () =>
      (
        (await run(action, formRequest("/login", { email: user.email, password: "correct-horse-battery" }))) as Response
      ).headers.get("set-cookie") ?? "";
    configure({ ...production, APP_URL: "https://pacewright.example", PACEWRIGHT_FAKES: "on" });
    expect(await setCookie()).toMatch(/;\s*Secure/i);
    configure({ ...production, APP_URL: "https://pacewright.example" });
    const prod = await setCookie();
    expect(prod).toMatch(/;\s*Secure/i);
    expect(prod).toMatch(/HttpOnly/i);
    expect(prod).toMatch(/SameSite=Lax/i);
    configure({ APP_URL: "http://localhost:3999" });
    expect(await setCookie()).not.toMatch(/Secure/i);
  });
});
