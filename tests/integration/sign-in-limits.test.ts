import bcrypt from "bcryptjs";
import { afterEach, describe, expect, it, vi } from "vitest";
import { BCRYPT_COST } from "~/.server/auth";
import { db } from "~/.server/db";
import { clearExpiredLimits, LIMITS, used } from "~/.server/security/rate-limits";
import * as login from "~/routes/login";
import * as signup from "~/routes/signup";
import * as forgot from "~/routes/forgot-password";
import * as invite from "~/routes/invite";
import * as reset from "~/routes/reset-password";
import { clientContext, formRequest, makeUser, run, statusOf, uniqueEmail } from "./helpers";

afterEach(() => vi.restoreAllMocks());

const attempt = (email: string, password: string, client = clientContext()) =>
  run(login.action, formRequest("/login", { email, password }), {}, client);

describe("sign-in limits", () => {
  it("checks at most the limit's count of passwords when 40 wrong ones for one address arrive at once", async () => {
    const user = await makeUser();
    const compare = vi.spyOn(bcrypt, "compare");
    const results = await Promise.all(Array.from({ length: 40 }, (_, i) => attempt(user.email, `wrong-guess-${i}`)));
    const statuses = results.map(statusOf);
    expect(compare.mock.calls.length).toBeLessThanOrEqual(LIMITS.signInAddress.points);
    expect(statuses.filter((s) => s === 400)).toHaveLength(LIMITS.signInAddress.points);
    expect(statuses.filter((s) => s === 429)).toHaveLength(40 - LIMITS.signInAddress.points);
    // Even the right password waits out the window now.
    expect(statusOf(await attempt(user.email, "correct-horse-battery"))).toBe(429);
  });

  it("limits one client trying many addresses, in parallel too", async () => {
    const client = clientContext("203.0.113.7");
    const compare = vi.spyOn(bcrypt, "compare");
    const results = await Promise.all(
      Array.from({ length: 40 }, () => attempt(uniqueEmail("spray"), "Winter2026!", client)),
    );
    expect(compare.mock.calls.length).toBeLessThanOrEqual(LIMITS.signInClient.points);
    expect(results.map(statusOf).filter((s) => s === 429)).toHaveLength(40 - LIMITS.signInClient.points);
    // Another client is not affected.
    expect(statusOf(await attempt(uniqueEmail("spray"), "Winter2026!"))).toBe(400);
  });

  it("does not count good sign-ins against the client, and a good password clears the address's failures", async () => {
    const user = await makeUser();
    const client = clientContext("203.0.113.8");
    for (let i = 0; i < 3; i++) expect(statusOf(await attempt(user.email, "nope-nope-nope", client))).toBe(400);
    expect(await used("signInAddress", user.email)).toBe(3);
    const ok = await attempt(user.email, "correct-horse-battery", client);
    expect((ok as Response).status).toBe(302);
    expect(await used("signInAddress", user.email)).toBe(0);
    expect(await used("signInClient", "203.0.113.8")).toBe(3);
  });

  it("hashes the unknown-address comparison at the same cost: timing ratio within 1.3", async () => {
    const user = await makeUser();
    const stored = (await import("~/.server/models")).User;
    const row = await stored.findByPk(user.id);
    expect(row!.passwordHash.slice(4, 6)).toBe(String(BCRYPT_COST));
    const { dummyPasswordHash } = await import("~/.server/auth");
    expect((await dummyPasswordHash()).slice(4, 6)).toBe(String(BCRYPT_COST));
    await attempt(uniqueEmail("warm"), "warm-up-password"); // builds the dummy hash once
    const known: number[] = [];
    const unknown: number[] = [];
    for (let i = 0; i < 8; i++) {
      let t = performance.now();
      expect(statusOf(await attempt(user.email, `wrong-${i}-password`))).toBe(400);
      known.push(performance.now() - t);
      t = performance.now();
      expect(statusOf(await attempt(uniqueEmail("ghost"), `wrong-${i}-password`))).toBe(400);
      unknown.push(performance.now() - t);
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
    const ratio = median(known) / median(unknown);
    expect(ratio).toBeGreaterThan(1 / 1.3);
    expect(ratio).toBeLessThan(1.3);
  });
});

describe("sign-up and reset limits", () => {
  it("answers 429 after the per-client sign-up limit and creates nothing more", async () => {
    const client = clientContext("203.0.113.20");
    const statuses: number[] = [];
    for (let i = 0; i < LIMITS.signUpClient.points + 1; i++) {
      const res = await run(
        signup.action,
        formRequest("/signup", {
          name: "Many",
          email: uniqueEmail("many"),
          password: "a-long-enough-pass",
          role: "athlete",
          timezone: "UTC",
        }),
        {},
        client,
      );
      statuses.push(statusOf(res));
    }
    expect(statuses.slice(0, -1).every((s) => s === 302)).toBe(true);
    expect(statuses.at(-1)).toBe(429);
  });

  it("limits reset requests per address the same way for known and unknown addresses", async () => {
    const user = await makeUser();
    for (const email of [user.email, uniqueEmail("ghost")]) {
      const statuses: number[] = [];
      for (let i = 0; i < LIMITS.resetAddress.points + 1; i++)
        statuses.push(statusOf(await run(forgot.action, formRequest("/forgot-password", { email }))));
      expect(statuses.at(-1)).toBe(429);
      expect(statuses.slice(0, -1).every((s) => s === 200)).toBe(true);
    }
  });

  it("limits attempts per invitation token, from any client, and token submissions per client", async () => {
    const token = "y".repeat(43);
    const statuses: number[] = [];
    for (let i = 0; i < LIMITS.inviteToken.points + 1; i++) {
      statuses.push(
        statusOf(
          await run(
            invite.action,
            formRequest(`/invite/${token}`, { name: "N", password: "a-long-enough-pass", timezone: "UTC" }),
            { token },
          ),
        ),
      );
    }
    expect(statuses.slice(0, -1).every((s) => s === 400)).toBe(true);
    expect(statuses.at(-1)).toBe(429);
    const client = clientContext("203.0.113.30");
    const resets: number[] = [];
    for (let i = 0; i < LIMITS.tokenClient.points + 1; i++) {
      const t = `${i}`.padStart(43, "z");
      resets.push(
        statusOf(
          await run(
            reset.action,
            formRequest(`/reset-password/${t}`, { password: "brand-new-password", confirm: "brand-new-password" }),
            { token: t },
            client,
          ),
        ),
      );
    }
    expect(resets.at(-1)).toBe(429);
    expect(resets.slice(0, -1).every((s) => s === 400)).toBe(true);
  });

  it("clears counters whose window has ended", async () => {
    const live = uniqueEmail("live");
    const old = uniqueEmail("old");
    await attempt(live, "wrong-password-1");
    await attempt(old, "wrong-password-1");
    expect(await used("signInAddress", old)).toBe(1);
    const rows = async () =>
      Number(((await db().query("SELECT COUNT(*) AS n FROM rate_limits", { plain: true })) as { n: number }).n);
    const before = await rows();
    await clearExpiredLimits(Date.now() + LIMITS.signInAddress.duration * 1000 + 1000);
    expect(await rows()).toBeLessThan(before);
    expect(await used("signInAddress", live)).toBe(0);
  });
});
