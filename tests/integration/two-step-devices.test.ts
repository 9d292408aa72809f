import { describe, expect, it } from "vitest";
import { SignInSession, RecoveryCode, User } from "~/.server/models";
import { totp } from "~/.server/security/totp";
import { LIMITS } from "~/.server/security/rate-limits";
import * as login from "~/routes/login";
import * as twoStep from "~/routes/login-two-step";
import * as security from "~/routes/account/security";
import * as layout from "~/routes/app-layout";
import { cookieFrom, formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const password = "correct-horse-battery";

async function withUserAgent(request: Request, ua: string) {
  request.headers.set("User-Agent", ua);
  return request;
}

async function passwordStep(email: string) {
  const res = (await run(login.action, formRequest("/login", { email, password }))) as Response;
  expect(res.status).toBe(302);
  return res;
}

async function enrol(email: string) {
  const cookie = await signIn(email);
  expect(
    payloadOf(await run(security.action, formRequest("/account/security", { intent: "two-step-start" }, { cookie })))
      .status,
  ).toBe("success");
  const page = payloadOf(await run(security.loader, getRequest("/account/security", cookie)));
  const secret: string = page.twoStep.enrolment.secret;
  expect(page.twoStep.enrolment.qrSvg).toMatch(/^<svg/);
  expect(page.twoStep.enrolment.uri).toMatch(/^otpauth:\/\/totp\/Pacewright:.*secret=/);
  const wrong = await run(
    security.action,
    formRequest(
      "/account/security",
      { intent: "two-step-confirm", code: "000000" === totp(secret).generate() ? "111111" : "000000" },
      { cookie },
    ),
  );
  expect(statusOf(wrong)).toBe(400);
  // The refusal sits beside the code field, and the code sent is not echoed back to refill it.
  expect(payloadOf(wrong).error.code[0]).toMatch(/does not match/);
  expect(payloadOf(wrong).initialValue?.code).toBeUndefined();
  const empty = await run(
    security.action,
    formRequest("/account/security", { intent: "two-step-confirm", code: " " }, { cookie }),
  );
  expect(statusOf(empty)).toBe(400);
  expect(payloadOf(empty).error.code[0]).toBe("Enter the six-digit code your app shows.");
  // One step back, as a phone a little slow would show it; the current step stays free for the first sign-in.
  const done = payloadOf(
    await run(
      security.action,
      formRequest(
        "/account/security",
        { intent: "two-step-confirm", code: totp(secret).generate({ timestamp: Date.now() - 30_000 }) },
        { cookie },
      ),
    ),
  );
  expect(done.status).toBe("success");
  expect(done.recoveryCodes).toHaveLength(10);
  return { secret, recoveryCodes: done.recoveryCodes as string[], cookie };
}

async function secondStep(pendingCookie: string, code: string) {
  const req = formRequest("/login/two-step", { code });
  req.headers.set("Cookie", pendingCookie);
  return run(twoStep.action, req);
}

describe("two-step sign-in", () => {
  it("enrols with a QR code, then asks for the code after the password; a code and a recovery code each work once", async () => {
    const coach = await makeUser({ role: "coach" });
    const { secret, recoveryCodes } = await enrol(coach.email);
    const sessionsBefore = await SignInSession.count({ where: { userId: coach.id } });

    const first = await passwordStep(coach.email);
    expect(first.headers.get("location")).toBe("/login/two-step");
    const pending = cookieFrom(first);
    expect(pending).toMatch(/^pw_two_step=/);
    expect(await SignInSession.count({ where: { userId: coach.id } })).toBe(sessionsBefore); // the password alone opened nothing

    expect(statusOf(await secondStep(pending, "123456" === totp(secret).generate() ? "654321" : "123456"))).toBe(400);
    const code = totp(secret).generate();
    const ok = (await secondStep(pending, code)) as Response;
    expect(ok.status).toBe(302);
    expect(ok.headers.get("location")).toBe("/coach");
    const session = cookieFrom(ok);
    expect(statusOf(await run(layout.loader, getRequest("/coach", session)))).toBe(200);
    // The same code again (a replay) is refused.
    expect(statusOf(await secondStep(cookieFrom(await passwordStep(coach.email)), code))).toBe(400);

    // A recovery code: once.
    const again = cookieFrom(await passwordStep(coach.email));
    expect(statusOf(await secondStep(again, recoveryCodes[0].toUpperCase()))).toBe(302);
    expect(statusOf(await secondStep(cookieFrom(await passwordStep(coach.email)), recoveryCodes[0]))).toBe(400);
    expect(await RecoveryCode.count({ where: { userId: coach.id, usedAt: null } })).toBe(9);
    // Recovery codes are stored as hashes only.
    const stored = await RecoveryCode.findAll({ where: { userId: coach.id } });
    expect(stored.some((r) => recoveryCodes.some((c) => r.codeHash.includes(c.replace("-", ""))))).toBe(false);
  });

  it("without the pending cookie the code page sends you back to the password, and wrong codes are limited per account", async () => {
    const admin = await makeUser({ role: "admin" });
    await enrol(admin.email);
    const bare = await run(twoStep.action, formRequest("/login/two-step", { code: "123456" }));
    expect((bare as Response).headers.get("location")).toBe("/login");
    const pending = cookieFrom(await passwordStep(admin.email));
    const statuses: number[] = [];
    for (let i = 0; i < LIMITS.twoStepUser.points + 1; i++)
      statuses.push(statusOf(await secondStep(pending, "abcde-fghij")));
    expect(statuses.at(-1)).toBe(429);
  });

  it("is for coaches and admins; a studio setting makes it required, and until then the app sends them to set it up", async () => {
    const athlete = await makeUser({ role: "athlete" });
    const ac = await signIn(athlete.email);
    expect(payloadOf(await run(security.loader, getRequest("/account/security", ac))).twoStep).toBeNull();
    expect(
      statusOf(
        await run(security.action, formRequest("/account/security", { intent: "two-step-start" }, { cookie: ac })),
      ),
    ).toBe(400);

    const admin = await makeUser({ role: "admin" });
    const coach = await makeUser({ role: "coach" });
    const adminCookie = await signIn(admin.email);
    const coachCookie = await signIn(coach.email);
    expect(
      statusOf(
        await run(
          security.action,
          formRequest("/account/security", { intent: "studio-require", required: "on" }, { cookie: coachCookie }),
        ),
      ),
    ).toBe(403);
    expect(
      payloadOf(
        await run(
          security.action,
          formRequest("/account/security", { intent: "studio-require", required: "on" }, { cookie: adminCookie }),
        ),
      ).status,
    ).toBe("success");
    try {
      const sent = await run(layout.loader, getRequest("/coach", coachCookie));
      expect((sent as Response).headers.get("location")).toBe("/account/security");
      expect(statusOf(await run(layout.loader, getRequest("/account/security", coachCookie)))).toBe(200);
      expect(statusOf(await run(layout.loader, getRequest("/athlete", ac)))).toBe(200); // athletes are not asked
      const { secret } = await enrol(coach.email);
      expect(statusOf(await run(layout.loader, getRequest("/coach", coachCookie)))).toBe(200);
      // While required it cannot be turned off.
      const off = await run(
        security.action,
        formRequest(
          "/account/security",
          { intent: "two-step-disable", code: totp(secret).generate() },
          { cookie: coachCookie },
        ),
      );
      expect(statusOf(off)).toBe(400);
      expect((await User.findByPk(coach.id))!.totpEnabledAt).not.toBeNull();
    } finally {
      await run(
        security.action,
        formRequest("/account/security", { intent: "studio-require" }, { cookie: adminCookie }),
      );
    }
    // An unticked box sends nothing: that is the optional setting again.
    expect(payloadOf(await run(security.loader, getRequest("/account/security", adminCookie))).twoStep.required).toBe(
      false,
    );
  });
});

describe("signed-in devices", () => {
  it("lists the user's devices, signs one out, and signs out everywhere else but here", async () => {
    const user = await makeUser({ role: "athlete" });
    const ua = {
      phone:
        "Mozilla/5.0 (Linux; Android 14; Pixel 8) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/126.0 Mobile Safari/537.36",
      laptop: "Mozilla/5.0 (Macintosh; Intel Mac OS X 14_5; rv:128.0) Gecko/20100101 Firefox/128.0",
      tablet:
        "Mozilla/5.0 (iPad; CPU OS 17_5 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.5 Mobile/15E148 Safari/604.1",
    };
    const signInWith = async (agent: string) =>
      cookieFrom(
        (await run(
          login.action,
          await withUserAgent(formRequest("/login", { email: user.email, password }), agent),
        )) as Response,
      );
    const here = await signInWith(ua.laptop);
    const phone = await signInWith(ua.phone);
    await signInWith(ua.tablet);
    const other = await makeUser({ role: "athlete" });
    const otherCookie = await signIn(other.email);

    const page = payloadOf(await run(security.loader, getRequest("/account/security", here)));
    expect(page.devices.map((d: { label: string; current: boolean }) => [d.label, d.current]).sort()).toEqual([
      ["Chrome on Android", false],
      ["Firefox on macOS", true],
      ["Safari on iOS", false],
    ]);
    const phoneHandle = page.devices.find((d: { label: string }) => d.label === "Chrome on Android").handle;
    // Another user cannot end this user's session.
    expect(
      statusOf(
        await run(
          security.action,
          formRequest("/account/security", { intent: "sign-out-device", handle: phoneHandle }, { cookie: otherCookie }),
        ),
      ),
    ).toBe(404);
    expect(statusOf(await run(layout.loader, getRequest("/athlete", phone)))).toBe(200);
    expect(
      payloadOf(
        await run(
          security.action,
          formRequest("/account/security", { intent: "sign-out-device", handle: phoneHandle }, { cookie: here }),
        ),
      ).status,
    ).toBe("success");
    expect(statusOf(await run(layout.loader, getRequest("/athlete", phone)))).toBe(302);

    const res = payloadOf(
      await run(security.action, formRequest("/account/security", { intent: "sign-out-others" }, { cookie: here })),
    );
    expect(res.message).toBe("Signed out 1 other device.");
    expect(await SignInSession.count({ where: { userId: user.id } })).toBe(1);
    expect(statusOf(await run(layout.loader, getRequest("/athlete", here)))).toBe(200);
    expect(statusOf(await run(layout.loader, getRequest("/athlete", otherCookie)))).toBe(200);
  });
});
