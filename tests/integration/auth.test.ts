import { describe, expect, it } from "vitest";
import { SignInSession, OutboundEmail, PasswordReset, User } from "~/.server/models";
import { db } from "~/.server/db";
import { WRONG_CREDENTIALS } from "~/.server/auth";
import * as login from "~/routes/login";
import * as logout from "~/routes/logout";
import * as signup from "~/routes/signup";
import * as forgot from "~/routes/forgot-password";
import * as reset from "~/routes/reset-password";
import * as roster from "~/routes/coach/roster";
import * as adminUsers from "~/routes/admin/users";
import * as layout from "~/routes/app-layout";
import {
  cookieFrom,
  fieldErrorsOf,
  formRequest,
  getRequest,
  makeUser,
  payloadOf,
  run,
  signIn,
  statusOf,
  toastOf,
  uniqueEmail,
} from "./helpers";

describe("sign up", () => {
  it("creates a coach, signs them in and sends them to the roster", async () => {
    const email = uniqueEmail("coach");
    const res = await run(
      signup.action,
      formRequest("/signup", {
        name: "Kim Hale",
        email: email.toUpperCase(),
        password: "a-long-enough-pass",
        role: "coach",
        timezone: "Europe/Oslo",
      }),
    );
    expect(res).toBeInstanceOf(Response);
    expect((res as Response).headers.get("location")).toBe("/coach");
    const user = await User.findOne({ where: { email } });
    expect(user?.role).toBe("coach");
    expect(user?.email).toBe(email); // stored lower-cased
    expect(user?.passwordHash).toMatch(/^\$2[aby]\$1[0-9]\$/); // bcrypt, cost >= 10
    const cookie = cookieFrom(res as Response);
    const home = await run(roster.loader, getRequest("/coach", cookie));
    expect(payloadOf(home).athletes).toEqual([]);
  });

  it("refuses a duplicate address in any letter case and changes nothing", async () => {
    const existing = await makeUser({ role: "athlete" });
    const before = await User.count();
    const res = await run(
      signup.action,
      formRequest("/signup", {
        name: "Dup",
        email: existing.email.toUpperCase(),
        password: "a-long-enough-pass",
        role: "coach",
        timezone: "UTC",
      }),
    );
    expect(statusOf(res)).toBe(400);
    expect(fieldErrorsOf(res).email).toMatch(/already exists/);
    expect(await User.count()).toBe(before);
  });

  it("refuses a password under 10 characters, a bad address and an unknown zone, field by field", async () => {
    const before = await User.count();
    const res = await run(
      signup.action,
      formRequest("/signup", {
        name: "",
        email: "not-an-address",
        password: "short",
        role: "coach",
        timezone: "Mars/Olympus",
      }),
    );
    expect(statusOf(res)).toBe(400);
    const errors = fieldErrorsOf(res);
    expect(errors.password).toMatch(/at least 10/);
    expect(errors.email).toMatch(/valid e-mail/);
    expect(errors.name).toBeTruthy();
    expect(errors.timezone).toMatch(/time zone/);
    expect(payloadOf(res).initialValue.email).toBe("not-an-address"); // values come back to refill the form…
    expect(payloadOf(res).initialValue.password).toBeUndefined(); // …but never the password
    expect(await User.count()).toBe(before);
  });

  it("never lets a visitor sign up as admin", async () => {
    const res = await run(
      signup.action,
      formRequest("/signup", {
        name: "X",
        email: uniqueEmail(),
        password: "a-long-enough-pass",
        role: "admin",
        timezone: "UTC",
      }),
    );
    expect(statusOf(res)).toBe(400);
    expect(fieldErrorsOf(res).role).toBeTruthy();
  });
});

describe("sign in and out", () => {
  it("gives the same message for a wrong password and an unknown address", async () => {
    const user = await makeUser();
    const wrong = await run(login.action, formRequest("/login", { email: user.email, password: "not-the-password" }));
    const unknown = await run(
      login.action,
      formRequest("/login", { email: uniqueEmail("nobody"), password: "whatever-it-is" }),
    );
    expect(statusOf(wrong)).toBe(400);
    expect(statusOf(unknown)).toBe(400);
    expect(fieldErrorsOf(wrong)).toEqual({ form: WRONG_CREDENTIALS });
    expect(fieldErrorsOf(unknown)).toEqual({ form: WRONG_CREDENTIALS });
  });

  it("issues a new session id at every sign-in and only accepts local redirect targets", async () => {
    const user = await makeUser({ role: "coach" });
    const a = await signIn(user.email);
    const b = await signIn(user.email);
    expect(a).not.toBe(b);
    const evil = await run(
      login.action,
      formRequest("/login", {
        email: user.email,
        password: "correct-horse-battery",
        redirectTo: "//evil.example/steal",
      }),
    );
    expect((evil as Response).headers.get("location")).toBe("/coach");
    const local = await run(
      login.action,
      formRequest("/login", { email: user.email, password: "correct-horse-battery", redirectTo: "/coach?tab=2" }),
    );
    expect((local as Response).headers.get("location")).toBe("/coach?tab=2");
  });

  it("rejects the old cookie after sign-out", async () => {
    const user = await makeUser({ role: "coach" });
    const cookie = await signIn(user.email);
    expect(statusOf(await run(layout.loader, getRequest("/coach", cookie)))).toBe(200);
    const out = await run(logout.action, formRequest("/logout", {}, { cookie }));
    expect((out as Response).status).toBe(302);
    expect(await SignInSession.count({ where: { userId: user.id } })).toBe(0);
    const again = await run(layout.loader, getRequest("/coach", cookie));
    expect(again).toBeInstanceOf(Response);
    expect((again as Response).headers.get("location")).toMatch(/^\/login\?redirectTo=/);
  });

  it("answers 429 after ten failed sign-ins for one address within 15 minutes", async () => {
    const user = await makeUser();
    for (let i = 0; i < 10; i++) {
      const res = await run(
        login.action,
        formRequest("/login", { email: user.email, password: `wrong-${i}-password` }),
      );
      expect(statusOf(res)).toBe(400);
    }
    const blocked = await run(
      login.action,
      formRequest("/login", { email: user.email, password: "correct-horse-battery" }),
    );
    expect(statusOf(blocked)).toBe(429);
    expect(fieldErrorsOf(blocked).form).toMatch(/Too many failed sign-ins/);
    // Failures older than the window no longer count.
    await db().query("UPDATE rate_limits SET expire = :past WHERE key LIKE 'signInAddress:%'", {
      replacements: { past: Date.now() - 1 },
    });
    const ok = await run(login.action, formRequest("/login", { email: user.email, password: "correct-horse-battery" }));
    expect((ok as Response).status).toBe(302);
  });
});

describe("roles", () => {
  it("gives an athlete 403 on coach and admin pages, and a coach 403 on admin pages", async () => {
    const athlete = await makeUser({ role: "athlete" });
    const coach = await makeUser({ role: "coach" });
    const ac = await signIn(athlete.email);
    const cc = await signIn(coach.email);
    expect(statusOf(await run(roster.loader, getRequest("/coach", ac)))).toBe(403);
    expect(statusOf(await run(roster.action, formRequest("/coach", { email: uniqueEmail() }, { cookie: ac })))).toBe(
      403,
    );
    expect(statusOf(await run(adminUsers.loader, getRequest("/admin/users", cc)))).toBe(403);
  });

  it("lets an admin change a role, but not remove their own", async () => {
    const admin = await makeUser({ role: "admin" });
    const target = await makeUser({ role: "athlete" });
    const cookie = await signIn(admin.email);
    const res = await run(
      adminUsers.action,
      formRequest("/admin/users", { userId: String(target.id), role: "coach" }, { cookie }),
    );
    expect(payloadOf(res)).toMatchObject({ status: "success", message: expect.stringMatching(/is now coach/) });
    expect((await User.findByPk(target.id))?.role).toBe("coach");
    const self = await run(
      adminUsers.action,
      formRequest("/admin/users", { userId: String(admin.id), role: "athlete" }, { cookie }),
    );
    expect(statusOf(self)).toBe(400);
    expect(fieldErrorsOf(self).role).toMatch(/cannot remove your own admin role/);
    expect((await User.findByPk(admin.id))?.role).toBe("admin");
    const bad = await run(
      adminUsers.action,
      formRequest("/admin/users", { userId: String(target.id), role: "owner" }, { cookie }),
    );
    expect(statusOf(bad)).toBe(400);
    expect(fieldErrorsOf(bad).role).toBe("Choose a role.");
    expect((await User.findByPk(target.id))?.role).toBe("coach");
  });
});

function linkIn(text: string, pathPrefix: string) {
  const m = text.match(new RegExp(`http://localhost:3999${pathPrefix}([A-Za-z0-9_-]{43})`));
  if (!m) throw new Error(`no ${pathPrefix} link in: ${text}`);
  return m[1];
}

describe("password reset", () => {
  it("e-mails a single-use link stored only as a hash, and signs out every session on use", async () => {
    const user = await makeUser();
    const session = await signIn(user.email);
    const res = await run(forgot.action, formRequest("/forgot-password", { email: user.email.toUpperCase() }));
    expect(payloadOf(res)).toMatchObject({
      status: "success",
      message: `If an account uses ${user.email}, a reset link is on its way. Check your inbox.`,
    });
    const mail = await OutboundEmail.findOne({ where: { toAddress: user.email, template: "password-reset" } });
    expect(mail).toBeTruthy();
    const token = linkIn(mail!.textBody, "/reset-password/");
    const row = await PasswordReset.findOne({ where: { userId: user.id } });
    expect(row!.tokenHash).not.toContain(token);
    expect(row!.expiresAt.getTime() - Date.now()).toBeLessThanOrEqual(60 * 60 * 1000);

    expect(payloadOf(await run(reset.loader, getRequest(`/reset-password/${token}`), { token })).valid).toBe(true);
    const mismatch = await run(
      reset.action,
      formRequest(`/reset-password/${token}`, { password: "brand-new-password", confirm: "other-password" }),
      { token },
    );
    expect(statusOf(mismatch)).toBe(400);
    expect(fieldErrorsOf(mismatch)).toEqual({ confirm: "The two passwords differ." });
    const done = await run(
      reset.action,
      formRequest(`/reset-password/${token}`, { password: "brand-new-password", confirm: "brand-new-password" }),
      { token },
    );
    expect((done as Response).headers.get("location")).toBe("/login");
    expect(await toastOf(done as Response)).toEqual({
      tone: "ok",
      message: "Your password was changed. Sign in with the new one.",
    });
    expect(await SignInSession.count({ where: { userId: user.id } })).toBe(0);
    expect(statusOf(await run(layout.loader, getRequest("/athlete", session)))).toBe(302);
    await signIn(user.email, "brand-new-password");

    const reused = await run(
      reset.action,
      formRequest(`/reset-password/${token}`, { password: "another-new-password", confirm: "another-new-password" }),
      { token },
    );
    expect(statusOf(reused)).toBe(400);
    expect(fieldErrorsOf(reused).form).toMatch(/expired or was already used/);
    await signIn(user.email, "brand-new-password"); // unchanged by the refused reuse
  });

  it("refuses an expired link and changes nothing", async () => {
    const user = await makeUser();
    await run(forgot.action, formRequest("/forgot-password", { email: user.email }));
    const mail = await OutboundEmail.findOne({ where: { toAddress: user.email }, order: [["id", "DESC"]] });
    const token = linkIn(mail!.textBody, "/reset-password/");
    await PasswordReset.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: user.id } });
    expect(payloadOf(await run(reset.loader, getRequest(`/reset-password/${token}`), { token })).valid).toBe(false);
    const res = await run(
      reset.action,
      formRequest(`/reset-password/${token}`, { password: "brand-new-password", confirm: "brand-new-password" }),
      { token },
    );
    expect(statusOf(res)).toBe(400);
    await signIn(user.email); // old password still works
  });

  it("answers an unknown address exactly like a known one, without sending anything", async () => {
    const before = await OutboundEmail.count();
    const ghost = uniqueEmail("ghost");
    const res = await run(forgot.action, formRequest("/forgot-password", { email: ghost }));
    expect(payloadOf(res)).toMatchObject({
      status: "success",
      message: `If an account uses ${ghost}, a reset link is on its way. Check your inbox.`,
    });
    expect(await OutboundEmail.count()).toBe(before);
    const garbage = "x".repeat(43);
    expect(payloadOf(await run(reset.loader, getRequest(`/reset-password/${garbage}`), { token: garbage })).valid).toBe(
      false,
    );
    expect(payloadOf(await run(reset.loader, getRequest(`/reset-password/short`), { token: "short" })).valid).toBe(
      false,
    );
  });
});
