import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, linkFromOutbox, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("plan shop in the browser", () => {
  const env = useApp({ beforeAll, afterAll });

  it("a coach lists a plan; an athlete buys it with the test card; calendar, receipt and sales table follow", async () => {
    const cctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const coach = await cctx.newPage();
    await signInAs(coach, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    await coach.goto(`${env.app.baseUrl}/coach/shop`);
    await ready(coach);
    await coach.getByLabel("Title in the shop").fill("Spring build for sale");
    await coach.getByLabel("Description").fill("Twelve weeks from base to threshold, tested every six weeks.");
    await coach.getByLabel("Price").fill("0");
    await coach.getByRole("button", { name: "Create listing" }).click();
    await coach.getByText("The price must be more than 0.").waitFor();
    await coach.getByLabel("Price").fill("29.50");
    await coach.getByRole("button", { name: "Create listing" }).click();
    await coach.getByText(/Listed “Spring build for sale”/).waitFor();
    const row = coach.locator("li", { hasText: "Spring build for sale" });
    await row.getByRole("button", { name: "Publish" }).click();
    await coach.getByText("Published: it is in the shop.").waitFor();

    const actx = await env.browser.newContext({ viewport: { width: 390, height: 844 } });
    const athlete = await actx.newPage();
    await signInAs(athlete, env.app.baseUrl, "ada@harbourline.example", "harbour-line-demo");
    await athlete.waitForURL(`${env.app.baseUrl}/athlete`);
    await athlete.goto(`${env.app.baseUrl}/shop`);
    await ready(athlete);
    await athlete.getByRole("link", { name: /Spring build for sale/ }).click();
    await athlete.waitForURL(/\/shop\/spring-build-for-sale-/);
    await ready(athlete);
    await athlete.getByRole("button", { name: "Buy for €29.50" }).click();
    await athlete.waitForURL(/\/pay\/cs_test_/);
    await shot(athlete, "fake-pay-page");
    await athlete.getByLabel("Card number").fill("4242 4242 4242 4242");
    await athlete.getByRole("button", { name: /^Pay/ }).click();
    await athlete.waitForURL(/\/shop\/orders\/\d+/);
    await athlete.locator("[data-testid=order-status][data-status=fulfilled]").waitFor();
    await shot(athlete, "order-fulfilled");
    await athlete.getByRole("link", { name: "Open my calendar" }).click();
    await athlete.waitForURL(/\/athlete\/calendar/);
    // Ada's demo threshold is 214 W: the shop plan's sessions show her watts.
    await athlete.getByText(/at \d+–\d+ W/).first().waitFor();

    const link = await linkFromOutbox(athlete, env.app.baseUrl, "ada@harbourline.example", "/athlete/calendar");
    expect(link).toContain("/athlete/calendar");
    await athlete.getByText("Your Pacewright receipt: Spring build for sale").waitFor();
    await actx.close();

    await coach.reload();
    await coach.getByRole("cell", { name: /Ada Okafor/ }).waitFor();
    expect(await coach.getByTestId("sale-status").first().textContent()).toBe("fulfilled");
    await shot(coach, "coach-sales");
    await cctx.close();
  });
});
