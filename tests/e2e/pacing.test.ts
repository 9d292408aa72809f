import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import sqlite3 from "sqlite3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, ready, SCREENSHOTS, shot, signInAs, useApp } from "./harness";
import { toCsv, type RideSample } from "../../db/demo/rides";

const enabled = browserAvailable();
const RIDER = "tomas@harbourline.example";

/** The demo rider's next planned 20-minute test that is alone among bike sessions on its day (so the file attaches to it). */
function nextTwentyMinuteTest(dbPath: string): Promise<{ id: number; date: string }> {
  const db = new sqlite3.Database(dbPath, sqlite3.OPEN_READONLY);
  return new Promise((resolve, reject) =>
    db.get(
      `SELECT s.id, s.date FROM scheduled_sessions s JOIN users u ON u.id = s.athlete_id
       WHERE u.email = ? AND s.test_protocol = 'twenty_minute' AND s.status = 'planned'
         AND NOT EXISTS (SELECT 1 FROM scheduled_sessions o WHERE o.athlete_id = s.athlete_id AND o.date = s.date AND o.id <> s.id AND o.sport = 'bike' AND o.status = 'planned')
       ORDER BY s.date LIMIT 1`,
      [RIDER],
      (err, row: { id: number; date: string } | undefined) => {
        db.close();
        if (err || !row) reject(err ?? new Error("no planned 20-minute test in the demo calendar"));
        else resolve(row);
      },
    ),
  );
}

/** Warm-up, then the effort ridden 8 % under, on, and 8 % over the plan's segments, then a cool-down. */
function rideAgainst(targets: number[]): string {
  const samples: RideSample[] = [];
  const parts: [number, number][] = [
    [900, 150],
    [400, targets[0] * 0.92],
    [400, targets[1]],
    [400, targets[2] * 1.08],
    [300, 100],
  ];
  for (const [n, w] of parts)
    for (let i = 0; i < n; i++)
      samples.push({
        t: samples.length,
        power: Math.round(w + ((samples.length * 7) % 5) - 2),
        hr: 150,
        cadence: 90,
        speed: 9,
      });
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-pacing-")), "test-day.csv");
  fs.writeFileSync(file, toCsv(samples));
  return file;
}

describe.skipIf(!enabled)("test day: plan the effort, print it, ride it, see it against the plan", () => {
  const env = useApp({ beforeAll, afterAll });

  it("an athlete opens a 20-minute test, prints its pacing plan on one page, uploads the ride and sees planned against ridden", async () => {
    const test = await nextTwentyMinuteTest(env.app.env.DATABASE_PATH);
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 }, deviceScaleFactor: 1 });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, RIDER, "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    await page.goto(`${env.app.baseUrl}/athlete/sessions/${test.id}`);
    await ready(page);
    const plan = page.getByTestId("pacing-plan");
    await plan.getByTestId("expected-power").waitFor();
    const rows = plan.getByTestId("segment");
    expect(await rows.count()).toBe(3);
    const targets = (await rows.getByTestId("segment-target").allTextContents()).map((t) =>
      Number(t.replace(/\D/g, "")),
    );
    expect(targets[0]).toBeLessThan(targets[1]);
    expect(targets[1]).toBeLessThan(targets[2]);
    await plan.getByText(/Firm but held back/).waitFor();
    // A loop course: the lap table appears with a target on every lap.
    await plan.getByLabel("Lap time (m:ss)").fill("4:30");
    await plan.getByRole("button", { name: "Plan the laps" }).click();
    await plan.getByTestId("pacing-laps").waitFor();
    expect(await plan.getByTestId("pacing-laps").locator("tbody tr").count()).toBeGreaterThanOrEqual(4);
    await shot(page, "pacing-plan-desktop");

    // The print view: the plan alone, on one A4 page.
    const printHref = await plan.getByRole("link", { name: "Print pacing plan" }).getAttribute("href");
    expect(printHref).toContain("lapTime=270");
    const print = await ctx.newPage();
    await print.goto(`${env.app.baseUrl}${printHref}`);
    await ready(print);
    await print.emulateMedia({ media: "print" });
    expect(await print.getByRole("button", { name: "Print" }).isVisible()).toBe(false);
    await print.getByTestId("pacing-laps").waitFor();
    fs.mkdirSync(SCREENSHOTS, { recursive: true });
    const pdf = await print.pdf({ format: "A4", printBackground: true });
    fs.writeFileSync(path.join(SCREENSHOTS, "pacing-plan-print.pdf"), pdf);
    const pages = pdf.toString("latin1").match(/\/Type\s*\/Page[^s]/g) ?? [];
    expect(pages.length).toBe(1);
    await shot(print, "pacing-plan-print");
    await print.close();

    // Ride it: the file goes onto the session and the segments are laid against the plan.
    await page.getByLabel(/Ride file/).setInputFiles(rideAgainst(targets));
    // The attach card goes away with its message once the session is done; the comparison is what stays.
    const outcome = page.getByTestId("pacing-outcome");
    await outcome.waitFor();
    await outcome.getByText("held back early").waitFor();
    const ridden = outcome.getByTestId("ridden-segment");
    expect(await ridden.count()).toBe(3);
    const cells = await ridden.nth(0).locator("td").allTextContents();
    expect(cells[1]).toBe(`${targets[0]} W`);
    expect(cells[3]).toMatch(/^-[78](\.\d)? %$/);
    await outcome.getByText(/treat it as a floor/).waitFor();
    await outcome.scrollIntoViewIfNeeded();
    await shot(page, "pacing-outcome-desktop");

    await page.setViewportSize({ width: 390, height: 844 });
    await outcome.waitFor();
    const width = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(width).toBeLessThanOrEqual(390);
    await shot(page, "pacing-outcome-phone");
    await ctx.close();
  });

  it("the ride page marks laps on the trace, shows the lap table, and hands the data back as CSV", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 }, deviceScaleFactor: 1 });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, RIDER, "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    // A critical power and W′ (3 min at 380 W, 12 min at 290 W → CP 260 W, W′ 21.6 kJ) put W′ balance under the trace.
    const yesterday = new Date(Date.now() - 86_400_000).toISOString().slice(0, 10);
    const cp = await page.request.post(`${env.app.baseUrl}/athlete/tests/new`, {
      data: {
        protocol: "critical_power",
        inputs: {
          efforts: [
            { duration: "3:00", meanW: 380 },
            { duration: "12:00", meanW: 290 },
          ],
        },
        testedOn: yesterday,
        readiness: { answers: ["no", "no", "no", "no", "no"], stopSignsRead: true },
        confirmed: true,
      },
      headers: { Origin: env.app.baseUrl },
      maxRedirects: 0,
    });
    expect(cp.status()).toBeLessThan(400);
    await page.goto(`${env.app.baseUrl}/athlete/uploads`);
    await ready(page);
    await page.getByRole("link", { name: "test-day.csv" }).first().click();
    await page.waitForURL(/\/athlete\/uploads\/\d+$/);
    await ready(page);
    await page.getByTestId("wbal-chart").waitFor();
    await page
      .getByTestId("wbal-note")
      .getByText(/critical power 260 W and W′ 21\.6 kJ/)
      .waitFor();
    await page.getByLabel(/Lap splits/).fill("15:00, 35:00");
    await page.getByRole("button", { name: "Save laps" }).click();
    const table = page.getByTestId("lap-table");
    await table.waitFor();
    await page.getByText("Laps saved.").waitFor();
    expect(await table.locator("tbody tr").count()).toBe(3);
    // Clicking the trace adds a fourth split.
    const box = (await page.locator(".recharts-surface").first().boundingBox())!;
    await page.mouse.move(box.x + box.width * 0.85, box.y + box.height / 2);
    await page.locator(".recharts-tooltip-wrapper").first().getByText(/min/).waitFor();
    await page.mouse.down();
    await page.mouse.up();
    await page.waitForFunction(
      () =>
        ((document.querySelector("input[name=splits]") as HTMLInputElement | null)?.value.split(",").length ?? 0) === 3,
    );
    expect((await page.getByLabel(/Lap splits/).inputValue()).split(",").length).toBe(3);
    await page.getByLabel("Effort score of lap 2").fill("9");
    await page.getByRole("button", { name: "Save laps" }).click();
    await page.waitForFunction(() => document.querySelectorAll("[data-testid=lap-table] tbody tr").length === 4);
    await page.getByTestId("band-load").waitFor();
    const csvHref = await page.getByRole("link", { name: "1 Hz data (CSV)" }).getAttribute("href");
    const res = await page.request.get(`${env.app.baseUrl}${csvHref}`);
    expect(res.status()).toBe(200);
    expect((await res.text()).split("\n")[0].trim()).toBe(
      "time_s,power_w,heart_rate_bpm,cadence_rpm,speed_mps,distance_m",
    );
    await shot(page, "ride-desktop");
    const phone = await env.browser.newContext({
      viewport: { width: 390, height: 844 },
      deviceScaleFactor: 1,
      storageState: await ctx.storageState(),
    });
    const small = await phone.newPage();
    await small.goto(page.url());
    await ready(small);
    await small.getByTestId("lap-table").waitFor();
    expect(await small.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await shot(small, "ride-phone");
    await phone.close();
    await ctx.close();
  });
});
