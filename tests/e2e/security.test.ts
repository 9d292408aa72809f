import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_ACCOUNTS } from "../../db/demo/accounts";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const run = browserAvailable() ? describe : describe.skip;

function expectSecurityHeaders(res: Response, what: string) {
  const csp = res.headers.get("content-security-policy") ?? "";
  expect(csp, what).toMatch(/default-src 'self'/);
  expect(csp, what).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]{20,}'/);
  expect(csp, what).toMatch(/style-src-attr 'unsafe-inline'/);
  expect(csp, what).toMatch(/frame-ancestors 'none'/);
  expect(csp, what).toMatch(/object-src 'none'/);
  expect(res.headers.get("x-content-type-options"), what).toBe("nosniff");
  expect(res.headers.get("referrer-policy"), what).toBe("same-origin");
  expect(res.headers.get("x-frame-options"), what).toBe("DENY");
  expect(res.headers.get("x-powered-by"), what).toBeNull();
}

run("security headers and content security policy", () => {
  const ctx = useApp({ beforeAll, afterAll });

  it("sends them on pages, JSON, the feed, files, refusals and errors, with a fresh nonce on every inline script", async () => {
    const base = ctx.app.baseUrl;
    const cases: [string, RequestInit | undefined, number][] = [
      ["/", undefined, 200],
      ["/login", undefined, 200],
      ["/healthz", undefined, 200],
      ["/api/sessions", { redirect: "manual" }, 302],
      [`/feed/${"x".repeat(43)}.ics`, undefined, 404],
      ["/favicon.svg", undefined, 200],
      ["/no-such-page", undefined, 404],
      ["/logout", { method: "POST", headers: { Origin: "https://evil.example" } }, 403],
    ];
    for (const [path, init, status] of cases) {
      const res = await fetch(base + path, init);
      expect(res.status, path).toBe(status);
      expectSecurityHeaders(res, path);
    }
    const a = await fetch(`${base}/login`);
    const b = await fetch(`${base}/login`);
    const nonceOf = (r: Response) => r.headers.get("content-security-policy")!.match(/'nonce-([^']+)'/)![1];
    expect(nonceOf(a)).not.toBe(nonceOf(b));
    const html = await a.text();
    const inline = [...html.matchAll(/<script(?![^>]*\bsrc=)([^>]*)>/g)];
    expect(inline.length).toBeGreaterThan(0);
    for (const [, attrs] of inline) expect(attrs).toContain(`nonce="${nonceOf(a)}"`);
  });

  it("lets the app hydrate and run in a browser with no policy violations", async () => {
    const page = await ctx.browser.newPage({ viewport: { width: 1280, height: 900 } });
    const violations: string[] = [];
    page.on("console", (m) => {
      if (/Content Security Policy|Refused to/i.test(m.text())) violations.push(m.text());
    });
    const athlete = DEMO_ACCOUNTS.people.find((p) => p.role === "athlete")!;
    await signInAs(page, ctx.app.baseUrl, athlete.email, DEMO_ACCOUNTS.password);
    await page.waitForURL(/\/athlete/);
    await ready(page);
    await page.goto(`${ctx.app.baseUrl}/athlete/feed`);
    await ready(page);
    const make = page.getByRole("button", { name: "Make my calendar link" });
    if (await make.count()) await make.click();
    const web = page.getByLabel("Web link", { exact: true });
    await web.waitFor();
    await page.getByRole("img", { name: "QR code of the subscribe link" }).waitFor();
    const link = await web.inputValue();
    expect(link).toMatch(/\/feed\/.+\.ics$/);
    const feed = await fetch(link);
    expect(feed.status).toBe(200);
    expectSecurityHeaders(feed, "feed");
    await page.goto(`${ctx.app.baseUrl}/athlete/load`);
    await ready(page);
    await shot(page, "security-load-page");
    expect(violations).toEqual([]);
    await page.close();
  });
});

run("two-step sign-in and devices in the browser", () => {
  const ctx = useApp({ beforeAll, afterAll });

  it("a coach sets up two-step sign-in from the QR page, signs in with a code, and sees this device", async () => {
    const { totp } = await import("../../app/.server/security/totp");
    const coach = DEMO_ACCOUNTS.people.find((p) => p.role === "coach")!;
    for (const [name, viewport] of [
      ["desktop", { width: 1280, height: 900 }],
      ["phone", { width: 390, height: 844 }],
    ] as const) {
      const context = await ctx.browser.newContext({ viewport });
      const page = await context.newPage();
      await signInAs(page, ctx.app.baseUrl, coach.email, DEMO_ACCOUNTS.password);
      if (name === "phone") {
        await page.waitForURL(/\/login\/two-step/);
        await ready(page);
        await page.getByLabel("Code").fill(totp(secret).generate());
        await page.getByRole("button", { name: "Continue" }).click();
      }
      await page.waitForURL(/\/coach/);
      await page.goto(`${ctx.app.baseUrl}/account/security`);
      await ready(page);
      if (name === "desktop") {
        await page.getByRole("button", { name: "Set up two-step sign-in" }).click();
        await page.getByRole("img", { name: /QR code to add Pacewright/ }).waitFor();
        secret = (await page.getByTestId("totp-secret").textContent())!.trim();
        await shot(page, "two-step-enrol-desktop");
        // Five digits never match a six-digit code: the refusal shows beside the field and nothing turns on.
        await page.getByLabel("Code the app shows").fill("12345");
        await page.getByRole("button", { name: "Turn on" }).click();
        await page.getByRole("alert").filter({ hasText: "That code does not match" }).waitFor();
        expect(await page.getByLabel("Code the app shows").getAttribute("aria-invalid")).toBe("true");
        await page.getByLabel("Code the app shows").fill(totp(secret).generate({ timestamp: Date.now() - 30_000 }));
        await page.getByRole("button", { name: "Turn on" }).click();
        await page.getByTestId("recovery-codes").waitFor();
        expect(await page.getByTestId("recovery-codes").locator("li").count()).toBe(10);
        await shot(page, "two-step-recovery-codes-desktop");
        // Shown once: the page loaded again counts them but never shows them.
        await page.reload();
        await ready(page);
        await page.getByText("On. 10 recovery codes left.").waitFor();
        expect(await page.getByTestId("recovery-codes").count()).toBe(0);
      } else {
        await page.getByText("this device").waitFor();
        expect(await page.getByTestId("devices").locator("li").count()).toBeGreaterThanOrEqual(2);
        await page.getByRole("button", { name: "Sign out everywhere else" }).click();
        await page.getByText(/Signed out \d+ other device/).waitFor();
        await shot(page, "devices-phone");
      }
      await context.close();
    }
  });
});
let secret = "";
