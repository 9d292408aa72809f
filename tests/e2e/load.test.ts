import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("training load in the browser", () => {
  const env = useApp({ beforeAll, afterAll });

  it("the demo cyclist marks a session done and the week's numbers and the weekly load bars change; the coach sees compliance", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);

    // The next planned session of this week or the next, read the way the calendar reads it.
    const next = await page.evaluate(async () => {
      const d = new Date();
      const monday = new Date(
        Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate() - ((d.getUTCDay() + 6) % 7) - 7),
      );
      const iso = (x: Date) => x.toISOString().slice(0, 10);
      const to = new Date(monday.getTime() + 27 * 86_400_000);
      const r = await fetch(`/api/calendar?from=${iso(monday)}&to=${iso(to)}`);
      const body = await r.json();
      const today = new Date().toISOString().slice(0, 10);
      return body.sessions.find((s: { status: string; date: string }) => s.status === "planned" && s.date >= today) as {
        id: number;
        date: string;
      };
    });
    expect(next).toBeTruthy();

    await page.goto(`${env.app.baseUrl}/athlete/load`);
    await ready(page);
    // The weekly bars (done filled, planned outlined): marking a session done adds to its week's done bar.
    const fitnessPath = () =>
      page
        .locator("[data-testid=weekly-load-chart] .recharts-bar-rectangle path")
        .evaluateAll((els) => els.map((e) => e.getAttribute("d")).join("|"));
    // No three-line trend chart with a dashed projection any more.
    expect(await page.locator("[data-testid=fitness-chart]").count()).toBe(0);
    await page.getByTestId("readiness-note").waitFor();
    await expect.poll(fitnessPath).toBeTruthy();
    const pathBefore = await fitnessPath();
    const weekOf = await page.evaluate((date) => {
      const d = new Date(`${date}T00:00:00Z`);
      d.setUTCDate(d.getUTCDate() - ((d.getUTCDay() + 6) % 7));
      return d.toISOString().slice(0, 10);
    }, next.date);
    const row = page.getByTestId("compliance-table").locator("tr", { hasText: weekOf });
    const before = await row.locator("td").nth(1).textContent();
    await shot(page, "load-before");

    await page.goto(`${env.app.baseUrl}/athlete/sessions/${next.id}`);
    await ready(page);
    await page.getByLabel(/^7 Hard$/).check();
    await page.getByRole("button", { name: "Mark done" }).click();
    await page.getByText("Marked done. Nice work.").waitFor();

    await page.goto(`${env.app.baseUrl}/athlete/load`);
    await ready(page);
    await expect.poll(fitnessPath).not.toBe(pathBefore);
    const after = await row.locator("td").nth(1).textContent();
    const doneOf = (s: string | null) => Number(s!.split("/")[0].trim());
    expect(doneOf(after)).toBe(doneOf(before) + 1);
    // The range is part of the URL: the loader reads it, the button shows it, and a reload keeps it.
    await page.getByRole("button", { name: "6 weeks" }).click();
    await page.waitForURL((u) => u.searchParams.get("range") === "6w");
    await expect.poll(() => page.getByRole("button", { name: "6 weeks" }).getAttribute("aria-pressed")).toBe("true");
    const weeksShown = () => page.getByTestId("compliance-table").locator("tbody tr").count();
    await expect.poll(weeksShown).toBeLessThan(13);
    await page.reload();
    await ready(page);
    expect(await page.getByRole("button", { name: "6 weeks" }).getAttribute("aria-pressed")).toBe("true");
    await shot(page, "load-after");
    await ctx.close();

    const cctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const coach = await cctx.newPage();
    await signInAs(coach, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    const tomas = coach.locator("tr", { hasText: "Tomás Reyes" }).getByTestId("roster-compliance");
    await expect.poll(() => tomas.textContent()).toMatch(/\d+ % \(\d+ of \d+ sessions\)/);
    await shot(coach, "roster-compliance");
    await cctx.close();
  });
});
