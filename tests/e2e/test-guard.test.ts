import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";
import { toCsv, type RideSample } from "../../db/demo/rides";

const enabled = browserAvailable();

/** A 20-minute test ridden as three rising laps (170, 200, 236 W) between a warm-up and a cool-down. */
function risingLapsFile(): string {
  const samples: RideSample[] = [];
  for (const [n, w] of [
    [900, 150],
    [400, 170],
    [400, 200],
    [400, 236],
    [600, 100],
  ] as const) {
    for (let i = 0; i < n; i++)
      samples.push({
        t: samples.length,
        power: w + ((samples.length * 7) % 9) - 4,
        hr: Math.round(100 + w / 4),
        cadence: 88,
        speed: 9,
      });
  }
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-laps-")), "rising-laps.csv");
  fs.writeFileSync(file, toCsv(samples));
  return file;
}

function notARideFile(): string {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-bad-")), "notes.csv");
  fs.writeFileSync(file, "date,notes\n2026-11-01,easy spin\n");
  return file;
}

async function uploadRising(page: Page, baseUrl: string) {
  await page.goto(`${baseUrl}/athlete/tests/new`);
  await ready(page);
  await page.getByLabel("Test", { exact: true }).selectOption("twenty_minute");
  await page.getByLabel("a ride file").check();
  await page.getByLabel(/Ride file/).setInputFiles(risingLapsFile());
  await page.getByText(/rising-laps.csv read: 45 min/).waitFor();
  // 0.95 × the laps' mean (≈ 202 W) against the demo rider's 262 W: −26.7 %.
  await page.getByTestId("proposal").getByText("192 W").waitFor();
  const guard = page.getByTestId("guard");
  await guard.getByText(/lower the threshold by −26\.7 %/).waitFor();
  await guard.getByText(/^Pacing: the last third was 3\d % stronger/).waitFor();
  await page
    .getByTestId("pacing")
    .getByText(/held back/)
    .waitFor();
  await page
    .getByTestId("pacing")
    .getByText(/rising/)
    .waitFor();
}

describe.skipIf(!enabled)("a large change needs a person to see why and agree", () => {
  const env = useApp({ beforeAll, afterAll });

  it("on a phone: the rising-laps warning, its reasons and the advice are readable, and save waits for the confirmation", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 390, height: 844 }, deviceScaleFactor: 1 });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    await uploadRising(page, env.app.baseUrl);
    for (const group of await page.getByRole("radiogroup").all()) await group.getByLabel("no").check();
    await page.getByLabel("I have read the stop signs").check();
    const saveButton = page.getByRole("button", { name: "Save and rescale" });
    expect(await saveButton.isDisabled()).toBe(true);
    await page.getByTestId("guard").scrollIntoViewIfNeeded();
    await shot(page, "test-guard-phone");
    const width = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(width).toBeLessThanOrEqual(390);
    await ctx.close();
  });

  it("on a desktop: a failed upload clears the last proposal; the rising file is flagged, confirmed and saved, and the save says so", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    await uploadRising(page, env.app.baseUrl);
    const saveButton = page.getByRole("button", { name: "Save and rescale" });

    // A second file that fails leaves no proposal, no warning and no enabled save from the first one.
    await page.getByLabel(/Ride file/).setInputFiles(notARideFile());
    await page
      .getByRole("alert")
      .getByText(/No power, heart-rate, cadence or speed column/)
      .waitFor();
    expect(await page.getByTestId("proposal").count()).toBe(0);
    expect(await page.getByTestId("guard").count()).toBe(0);
    expect(await page.getByText(/Pacing in thirds/).count()).toBe(0);
    expect(await saveButton.isDisabled()).toBe(true);
    await shot(page, "test-guard-failed-upload");

    // The rising file again: flagged; save stays off until readiness and the confirmation are given.
    await page.getByLabel(/Ride file/).setInputFiles(risingLapsFile());
    await page
      .getByTestId("guard")
      .getByText(/lower the threshold by −26\.7 %/)
      .waitFor();
    for (const group of await page.getByRole("radiogroup").all()) await group.getByLabel("no").check();
    await page.getByLabel("I have read the stop signs").check();
    expect(await saveButton.isDisabled()).toBe(true);
    await shot(page, "test-guard-desktop");
    await page.getByLabel(/I have read these reasons/).check();
    expect(await saveButton.isDisabled()).toBe(false);
    await saveButton.click();
    await page.waitForURL(/\/athlete\/tests$/);
    await page.getByText(/Bike power is now 192 W \(was 262 W\)/).waitFor();
    await page.getByText(/confirmed this change after the plausibility check/).waitFor();
    await page.getByTestId("tests-table").getByText("In force").first().waitFor();
    await shot(page, "test-guard-saved");

    // Undo: the test stays listed, marked undone with who and when.
    page.once("dialog", (d) => d.accept());
    await page.getByTestId("tests-table").getByRole("button", { name: "Undo" }).first().click();
    await page.getByText(/correction has been e-mailed/).waitFor();
    await page
      .getByTestId("tests-table")
      .getByText(/Undone \d{4}-\d{2}-\d{2} by /)
      .first()
      .waitFor();
    // Nothing on the page still claims the undone value.
    expect(await page.getByText(/Bike power is now 192 W/).count()).toBe(0);
    expect(await page.getByText("In force").count()).toBe(0);
    await shot(page, "test-guard-undone");
    await ctx.close();
  });

  it("typed results: the ramp asks for its rate and says when the 75 % rule does not hold; critical power shows its fit or names a bad pair", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    await page.goto(`${env.app.baseUrl}/athlete/tests/new`);
    await ready(page);
    await page.getByLabel("Test", { exact: true }).selectOption("ramp");
    await page.getByLabel("Best one-minute power (W)").fill("350");
    await page.getByLabel("Ramp rate (W added per minute)").fill("5");
    await page.getByRole("button", { name: "Preview the change" }).click();
    await page
      .getByTestId("ramp-facts")
      .getByText(/outside the usual 20–25 W per minute/)
      .waitFor();
    await page
      .getByTestId("guard")
      .getByText(/rose 5 W a minute/)
      .waitFor();
    await shot(page, "test-guard-typed-ramp");
    // Editing the number after the preview withdraws the proposal until it is previewed again.
    await page.getByLabel("Ramp rate (W added per minute)").fill("20");
    expect(await page.getByTestId("proposal").count()).toBe(0);
    await page.getByRole("button", { name: "Preview the change" }).click();
    await page
      .getByTestId("ramp-facts")
      .getByText(/within the usual 20–25 W per minute/)
      .waitFor();
    expect(await page.getByTestId("guard").count()).toBe(0);

    // From the demo ramp file: the steps are found past the warm-up and their rate is shown.
    await page.getByLabel("a ride file").check();
    await page.getByLabel(/Ride file/).setInputFiles(path.resolve("db/demo/files/ramp-test.csv"));
    await page
      .getByTestId("ramp-facts")
      .getByText(/Found 15 steps of 20 W every 60 s, from 100 W; last completed step 380 W/)
      .waitFor();
    await page
      .getByTestId("ramp-facts")
      .getByText(/Ramp rate 20 W per minute: within the usual/)
      .waitFor();
    await shot(page, "test-guard-ramp-file");
    await page.getByLabel("numbers I type").check();

    await page.getByLabel("Test", { exact: true }).selectOption("critical_power");
    await page.getByLabel("Effort 1 mean power (W)").fill("400");
    await page.getByRole("button", { name: "+ Add an effort" }).click();
    await page.getByLabel("Effort 3 duration").fill("6:00");
    await page.getByLabel("Effort 3 mean power (W)").fill("420");
    await page.getByLabel("Effort 2 mean power (W)").fill("300");
    await page.getByRole("button", { name: "Preview the change" }).click();
    await page.getByText(/The 6:00 effort \(420 W\) is not below the 3:00 effort \(400 W\)/).waitFor();
    await page.getByLabel("Effort 3 mean power (W)").fill("330");
    await page.getByRole("button", { name: "Preview the change" }).click();
    // 3:00 at 400 W, 6:00 at 330 W, 12:00 at 300 W lie close to one line: CP ≈ 267 W.
    await page
      .getByTestId("cp-fit")
      .getByText(/critical power 267 W .*r² [01]\.\d{3}/)
      .waitFor();
    await shot(page, "test-guard-typed-cp");
    await ctx.close();
  });
});
