import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("calendar by keyboard, month and print views", () => {
  const env = useApp({ beforeAll, afterAll });

  it("the athlete's month view steps by month and prints without the app's frame; the coach prints a plan", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    await page.goto(`${env.app.baseUrl}/athlete/calendar`);
    await ready(page);
    // Keyboard move on the two-week view: Space, one step right (a week later), Space.
    const today = await page.evaluate(() => new Date().toISOString().slice(0, 10));
    const handles = page.getByRole("button", { name: /^Move / });
    let moved: { name: string; from: string } | null = null;
    for (let i = 0; i < (await handles.count()); i++) {
      const h = handles.nth(i);
      const day = await h.evaluate((el) => el.closest("[data-day]")!.getAttribute("data-day")!);
      if (day > today) {
        const later = await page.evaluate((d) => {
          const x = new Date(`${d}T00:00:00Z`);
          x.setUTCDate(x.getUTCDate() + 7);
          return x.toISOString().slice(0, 10);
        }, day);
        if ((await page.getByTestId(`day-${later}`).count()) === 0) continue;
        moved = { name: (await h.getAttribute("aria-label"))!.slice(5), from: day };
        await h.focus();
        const posted = page.waitForResponse(
          (r) => r.url().includes("/api/calendar") && r.request().method() === "POST",
        );
        const live = page.locator('[id^="DndLiveRegion"]').first();
        // The announcement names the day under the session; wait for the target day itself, not the starting one.
        const target = await page.evaluate(
          (d) =>
            new Intl.DateTimeFormat("en-GB", {
              weekday: "long",
              day: "numeric",
              month: "long",
              timeZone: "UTC",
            }).format(new Date(`${d}T00:00:00Z`)),
          later,
        );
        await page.keyboard.press("Space");
        await expect.poll(() => live.textContent()).toMatch(/Picked up|is over/);
        await page.keyboard.press("ArrowRight");
        await expect.poll(() => live.textContent()).toContain(`is over ${target}`);
        await page.keyboard.press("Space");
        expect((await posted).status()).toBe(200);
        await page.getByTestId(`day-${later}`).getByText(moved.name).first().waitFor();
        break;
      }
    }
    expect(moved).not.toBeNull();
    // The move was saved (the page's loader, not local state, shows it after a reload), and the weeks are links.
    await page.reload();
    await page.getByTestId("calendar-session").first().waitFor();
    const firstDay = await page.locator("[data-day]").first().getAttribute("data-day");
    await page.getByRole("link", { name: "Later weeks" }).click();
    await page.waitForURL(/from=\d{4}-\d{2}-\d{2}/);
    const shifted = await page.evaluate((d) => {
      const x = new Date(`${d}T00:00:00Z`);
      x.setUTCDate(x.getUTCDate() + 14);
      return x.toISOString().slice(0, 10);
    }, firstDay!);
    await expect.poll(() => page.locator("[data-day]").first().getAttribute("data-day")).toBe(shifted);
    await page.goBack();
    await expect.poll(() => page.locator("[data-day]").first().getAttribute("data-day")).toBe(firstDay);

    await page.getByRole("navigation", { name: "Calendar view" }).getByRole("link", { name: "Month" }).click();
    await page.waitForURL(/view=month/);
    const month = await page.evaluate(() => new Date().toISOString().slice(0, 7));
    const first = page.getByTestId(`month-day-${month}-01`);
    await first.waitFor();
    expect((await page.locator('[data-testid^="month-day-"]').count()) % 7).toBe(0);
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
