import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();
const READY = { answers: ["no", "no", "no", "no", "no"], stopSignsRead: true };
const daysAgo = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10);

describe.skipIf(!enabled)("cross-check and running paces on the tests page", () => {
  const env = useApp({ beforeAll, afterAll });

  it("two tests a few days apart sit side by side; the mean is chosen and becomes the threshold", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 }, deviceScaleFactor: 1 });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    const save = async (body: object) => {
      const res = await page.request.post(`${env.app.baseUrl}/athlete/tests/new`, {
        data: { ...body, readiness: READY, confirmed: true },
        headers: { Origin: env.app.baseUrl },
        maxRedirects: 0,
      });
      expect(res.status()).toBeLessThan(400);
    };
    await save({ protocol: "twenty_minute", inputs: { meanW: 280 }, testedOn: daysAgo(6) });
    await save({ protocol: "eight_minute", inputs: { meanW: 300 }, testedOn: daysAgo(2) });
    await save({ protocol: "run_race", inputs: { distanceM: 10000, time: "42:30" }, testedOn: daysAgo(3) });
    await page.goto(`${env.app.baseUrl}/athlete/tests`);
    await ready(page);
    const card = page.getByTestId("cross-check");
    await card.getByText("266 W").first().waitFor();
    await card.getByText("270 W").first().waitFor();
    // |270 − 266| / 268 = 1.5 %
    await card.getByText(/They agree/).waitFor();
    await card.getByText(/\(1\.5 % apart\)/).waitFor();
    await page.getByTestId("running-paces").getByText("Interval").waitFor();
    await shot(page, "cross-check-desktop");
    await card.getByLabel(/Their mean/).check();
    await card.getByRole("button", { name: "Set the threshold and rescale" }).click();
    await card.getByText(/Threshold set to 268/).waitFor();
    await card
      .getByTestId("cross-check-settled")
      .getByText(/the mean of both tests/)
      .waitFor();

    const phone = await env.browser.newContext({
      viewport: { width: 390, height: 844 },
      deviceScaleFactor: 1,
      storageState: await ctx.storageState(),
    });
    const small = await phone.newPage();
    await small.goto(`${env.app.baseUrl}/athlete/tests`);
    await ready(small);
    await small.getByTestId("cross-check").waitFor();
    await shot(small, "cross-check-phone");
    expect(await small.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await phone.close();
    await ctx.close();
  });
});
