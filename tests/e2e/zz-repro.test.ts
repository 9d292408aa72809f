import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ready, shot, signInAs, useApp } from "./harness";

describe("repro", () => {
  const env = useApp({ beforeAll, afterAll });
  it("repro", async () => {
    const actx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const athlete = await actx.newPage();
    await signInAs(athlete, env.app.baseUrl, "ada@harbourline.example", "harbour-line-demo");
    await athlete.waitForURL(`${env.app.baseUrl}/athlete`);
    await athlete.goto(`${env.app.baseUrl}/shop`);
    await ready(athlete);
    await shot(athlete, "repro-shop");
    await athlete.locator("ul[aria-label='Plans for sale'] a").first().click();
    await ready(athlete);
    await athlete.getByRole("button", { name: /Buy for/ }).click();
    await athlete.waitForURL(/\/pay\/cs_test_/);
    await athlete.getByLabel("Card number").fill("4000 0000 0000 0002");
    await athlete.getByRole("button", { name: /^Pay/ }).click();
    await athlete.getByText("The card was declined").waitFor();
    await athlete.getByLabel("Card number").fill("4242 4242 4242 4242");
    await athlete.getByRole("button", { name: /^Pay/ }).click();
    await athlete.waitForURL(/\/shop\/orders\/\d+/);
    await athlete.waitForTimeout(1500);
    console.log("ORDER STATUS", await athlete.locator("[data-testid=order-status]").getAttribute("data-status"));
    await shot(athlete, "repro-order");
    const cctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const coach = await cctx.newPage();
    await signInAs(coach, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    await coach.goto(`${env.app.baseUrl}/coach/shop`);
    await ready(coach);
    const n = await coach.evaluate(() => new Promise<number>((r) => { let c = 0; const o = new MutationObserver((m) => (c += m.length)); o.observe(document.body, { subtree: true, childList: true, attributes: true, characterData: true }); setTimeout(() => { o.disconnect(); r(c); }, 1000); }));
    console.log("MUTATIONS/s", n);
    const what = await coach.evaluate(() => new Promise<string[]>((r) => { const seen: string[] = []; const o = new MutationObserver((ms) => { for (const m of ms) if (seen.length < 15) seen.push(m.type + " " + (m.target as Element).nodeName + " " + ((m.target as Element).outerHTML ?? m.target.textContent ?? "").slice(0, 160) + " attr=" + m.attributeName); }); o.observe(document.body, { subtree: true, childList: true, attributes: true, characterData: true }); setTimeout(() => { o.disconnect(); r(seen); }, 300); }));
    console.log("WHAT", what.join("\n"));
    await shot(coach, "repro-coach-shop");
  });
});
