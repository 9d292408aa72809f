import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("month and print views", () => {
  const env = useApp({ beforeAll, afterAll });

  it("the athlete's month view steps by month and prints without the app's frame; the coach prints a plan", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    await page.goto(`${env.app.baseUrl}/athlete/calendar`);
    await ready(page);
    await page.getByRole("navigation", { name: "Calendar view" }).getByRole("link", { name: "Month" }).click();
    await page.waitForURL(/view=month/);
    const month = await page.evaluate(() => new Date().toISOString().slice(0, 7));
    const first = page.getByTestId(`month-day-${month}-01`);
    await first.waitFor();
    expect(await page.locator('[data-testid^="month-day-"]').count() % 7).toBe(0);
    expect(await page.getByTestId("calendar-session").count()).toBe(0);
    // The demo season has sessions this month; each links to its page.
    expect(await page.locator('[data-testid^="month-day-"] a[href^="/athlete/sessions/"]').count()).toBeGreaterThan(3);
    await page.getByRole("link", { name: "Next month" }).click();
    await page.waitForURL(/month=\d{4}-\d{2}/);
    await page.getByRole("link", { name: "Previous month" }).click();
    await page.getByTestId(`month-day-${month}-01`).waitFor();

    await page.emulateMedia({ media: "print" });
    expect(await page.getByRole("navigation", { name: "Main" }).isVisible()).toBe(false);
    expect(await page.getByRole("button", { name: "Print" }).isVisible()).toBe(false);
    // On paper each session carries its blocks with the athlete's own watts.
    await expect.poll(() => page.locator("body").innerText()).toMatch(/\d+ W/);
    await shot(page, "month-print");
    await page.emulateMedia({ media: "screen" });
    await ctx.close();

    const cctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const coach = await cctx.newPage();
    await signInAs(coach, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    await coach.goto(`${env.app.baseUrl}/coach/plans/1`);
    await ready(coach);
    await coach.getByRole("link", { name: "Print view" }).click();
    await coach.waitForURL(/\/print$/);
    await coach.getByTestId("print-week-1").waitFor();
    expect(await coach.getByTestId("print-week-12").count()).toBe(1);
    expect(await coach.getByTestId("print-week-1").innerText()).toMatch(/% /);
    await coach.emulateMedia({ media: "print" });
    expect(await coach.getByRole("navigation", { name: "Main" }).isVisible()).toBe(false);
    await shot(coach, "plan-print");
    await cctx.close();
  });
});
