import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();
const WIDTH = 390;

/** Every visible element whose box reaches past the viewport's right edge (or starts left of 0), by a short description. */
async function clipped(page: Page): Promise<string[]> {
  return page.evaluate((width) => {
    const out: string[] = [];
    for (const el of document.querySelectorAll<HTMLElement>("body *")) {
      const r = el.getBoundingClientRect();
      if (r.width === 0 || r.height === 0) continue;
      const style = getComputedStyle(el);
      if (style.visibility === "hidden" || style.position === "fixed") continue;
      if (el.closest("[aria-hidden=true], .sr-only")) continue;
      if (r.right > width + 1 || r.left < -1)
        out.push(
          `${el.tagName.toLowerCase()}${el.getAttribute("data-testid") ? `[${el.getAttribute("data-testid")}]` : ""} "${(el.textContent ?? "").trim().slice(0, 30)}" ${Math.round(r.left)}–${Math.round(r.right)}`,
        );
    }
    return out;
  }, WIDTH);
}
const pageWidth = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth);

describe.skipIf(!enabled)("on a phone", () => {
  const env = useApp({ beforeAll, afterAll });

  it("the coach's navigation folds into a menu; roster cards, the board's day lists and the athlete calendar fit 390 px; errors stay in the app", async () => {
    const ctx = await env.browser.newContext({
      viewport: { width: WIDTH, height: 844 },
      isMobile: true,
      hasTouch: true,
    });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/coach`);
    await ready(page);

    // Navigation: closed by default, every link whole once opened, and it closes again after a choice.
    const menu = page.getByRole("button", { name: "Menu" });
    await menu.waitFor();
    expect(await page.getByRole("navigation", { name: "Main" }).isVisible()).toBe(false);
    await menu.click();
    const nav = page.getByRole("navigation", { name: "Main" });
    await nav.waitFor();
    for (const label of ["Roster", "Session shelf", "Season plans", "Selling", "Calendar feed"]) {
      const box = (await nav.getByRole("link", { name: label }).boundingBox())!;
      expect(box.x).toBeGreaterThanOrEqual(0);
      expect(box.x + box.width).toBeLessThanOrEqual(WIDTH);
    }
    expect(await clipped(page)).toEqual([]);
    await shot(page, "phone-nav-open");
    await nav.getByRole("link", { name: "Roster" }).click();
    await expect.poll(() => nav.isVisible()).toBe(false);
    // Logo, menu and sign-out share one line.
    const logo = (await page.getByRole("link", { name: "Pacewright" }).first().boundingBox())!;
    const signOut = (await page.getByRole("button", { name: "Sign out" }).boundingBox())!;
    expect(Math.abs(logo.y + logo.height / 2 - (signOut.y + signOut.height / 2))).toBeLessThan(8);

    // Roster: one card per athlete, nothing wider than the phone.
    expect(await page.getByTestId("roster-card").count()).toBeGreaterThan(0);
    expect(await page.getByRole("table").isVisible()).toBe(false);
    expect(await pageWidth(page)).toBeLessThanOrEqual(WIDTH);
    expect(await clipped(page)).toEqual([]);
    await shot(page, "phone-roster");

    // Board: weeks one under the other, each a list of its days, no sideways scrolling.
    await page.goto(`${env.app.baseUrl}/coach/plans/1/board`);
    await ready(page);
    await page.getByTestId("slot-1-0").waitFor();
    expect(await pageWidth(page)).toBeLessThanOrEqual(WIDTH);
    const weeks = page.locator('[aria-label="Weeks of the plan"]');
    expect(await weeks.evaluate((el) => el.scrollWidth - el.clientWidth)).toBeLessThanOrEqual(1);
    const w1 = (await page.getByTestId("week-1").boundingBox())!;
    const w2 = (await page.getByTestId("week-2").boundingBox())!;
    expect(w2.y).toBeGreaterThan(w1.y + w1.height - 1);
    expect(await clipped(page)).toEqual([]);
    await shot(page, "phone-board");

    // A wrong address inside the app: our page, inside the shell, with the way back.
    const res = await page.goto(`${env.app.baseUrl}/coach/plans/999999/board`);
    expect(res!.status()).toBe(404);
    await page.getByTestId("app-error").getByText("Nothing here").waitFor();
    expect(await page.getByRole("button", { name: "Menu" }).count()).toBe(1);
    const res2 = await page.goto(`${env.app.baseUrl}/coach/no-such-page`);
    expect(res2!.status()).toBe(404);
    await page.getByTestId("app-error").getByText("Nothing here").waitFor();
    expect(await page.locator("body").innerText()).not.toMatch(/No route matches/);
    await page.getByRole("link", { name: "Back to your start page" }).waitFor();
    await shot(page, "phone-404");
    await ctx.close();

    // The athlete's calendar: a list of days under week headings, every day inside the screen.
    const actx = await env.browser.newContext({
      viewport: { width: WIDTH, height: 844 },
      isMobile: true,
      hasTouch: true,
    });
    const athlete = await actx.newPage();
    await signInAs(athlete, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await athlete.waitForURL(`${env.app.baseUrl}/athlete`);
    await athlete.goto(`${env.app.baseUrl}/athlete/calendar`);
    await ready(athlete);
    await athlete
      .getByText(/^Week of /)
      .first()
      .waitFor();
    expect(await athlete.getByText(/^Week of /).count()).toBe(2);
    expect(await pageWidth(athlete)).toBeLessThanOrEqual(WIDTH);
    expect(await clipped(athlete)).toEqual([]);
    await shot(athlete, "phone-calendar");
    // A coach page is not for an athlete: 403 in our words, inside the shell.
    const res3 = await athlete.goto(`${env.app.baseUrl}/coach/plans`);
    if (res3!.status() === 403) await athlete.getByTestId("app-error").getByText("Not for this account").waitFor();
    await actx.close();
  });
});
