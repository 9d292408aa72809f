import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, linkFromOutbox, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

/** DOM changes in `ms` of an idle page: a settled page makes none. */
const mutationsIn = (page: Page, ms: number) =>
  page.evaluate(
    (ms) =>
      new Promise<number>((resolve) => {
        let n = 0;
        const o = new MutationObserver((m) => (n += m.length));
        o.observe(document.body, { subtree: true, childList: true, attributes: true, characterData: true });
        setTimeout(() => {
          o.disconnect();
          resolve(n);
        }, ms);
      }),
    ms,
  );

describe.skipIf(!enabled)("plan shop in the browser", () => {
  const env = useApp({ beforeAll, afterAll });

  it("a coach lists a plan; an athlete is declined, pays on the same page, and gets sessions; the coach refunds by clicking", async () => {
    const cctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const coach = await cctx.newPage();
    await signInAs(coach, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    await coach.goto(`${env.app.baseUrl}/coach/shop`);
    await ready(coach);
    const create = coach.locator("form", { has: coach.getByRole("button", { name: "Create listing" }) });
    await create.getByLabel("Title in the shop").fill("Spring build for sale");
    await create.getByLabel("Cover text").fill("Base to threshold, tested every six weeks");
    await create.getByLabel("Description").fill("Twelve weeks from base to threshold, tested every six weeks.");
    await create.getByLabel("Price").fill("0.001");
    await create.getByRole("button", { name: "Create listing" }).click();
    await coach.getByText("Enter the price as a number with at most two decimals, like 29.50.").waitFor();
    await create.getByLabel("Price").fill("0.49");
    await create.getByRole("button", { name: "Create listing" }).click();
    await coach.getByText("The price must be at least 0.50.").waitFor();
    await create.getByLabel("Price").fill("29.50");
    await create.getByRole("button", { name: "Create listing" }).click();
    await coach.getByText(/Listed “Spring build for sale”/).waitFor();
    const row = coach.getByTestId("listing-row").filter({ hasText: "Spring build for sale" });
    await row.getByRole("button", { name: "Publish", exact: true }).click();
    await coach.getByText("Published: it is in the shop.").waitFor();

    const actx = await env.browser.newContext({ viewport: { width: 390, height: 844 } });
    const athlete = await actx.newPage();
    await signInAs(athlete, env.app.baseUrl, "ada@harbourline.example", "harbour-line-demo");
    await athlete.waitForURL(`${env.app.baseUrl}/athlete`);
    await athlete.goto(`${env.app.baseUrl}/shop`);
    await ready(athlete);
    // Inside the app shell: the athlete's own navigation (folded into the menu on a phone) and sign-out are there.
    await athlete.getByRole("button", { name: "Menu" }).click();
    await athlete.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Plan shop" }).waitFor();
    await athlete.getByRole("button", { name: "Menu" }).click();
    await athlete.getByRole("button", { name: "Sign out" }).waitFor();
    await shot(athlete, "shop-phone");
    await athlete.getByRole("link", { name: /Spring build for sale/ }).click();
    await athlete.waitForURL(/\/shop\/spring-build-for-sale-/);
    await ready(athlete);
    await athlete.getByText("Base to threshold, tested every six weeks").first().waitFor();
    await shot(athlete, "listing-phone");
    await athlete.getByRole("button", { name: "Buy for €29.50" }).click();
    await athlete.waitForURL(/\/pay\/cs_test_/);
    await athlete.getByLabel("Card number").fill("4000 0000 0000 0002");
    await athlete.getByRole("button", { name: /^Pay/ }).click();
    await athlete.getByText("The card was declined. Try another card.").waitFor();
    await athlete.getByLabel("Card number").fill("4242 4242 4242 4242");
    await athlete.getByRole("button", { name: /^Pay/ }).click();
    await athlete.waitForURL(/\/shop\/orders\/\d+/);
    await athlete.locator("[data-testid=order-status][data-status=fulfilled][data-placed=yes]").waitFor();
    await shot(athlete, "order-fulfilled-phone");
    await athlete.getByRole("link", { name: "Open my calendar" }).click();
    await athlete.waitForURL(/\/athlete\/calendar/);
    // Ada's demo threshold is 214 W: the shop plan's sessions show her watts.
    await athlete
      .getByText(/at \d+–\d+ W/)
      .first()
      .waitFor();
    const link = await linkFromOutbox(athlete, env.app.baseUrl, "ada@harbourline.example", "/athlete/calendar");
    expect(link).toContain("/athlete/calendar");
    await athlete.getByText("Your Pacewright receipt: Spring build for sale").waitFor();

    // The Selling page settles once orders exist (it used to re-render thousands of times a second).
    await coach.reload();
    await ready(coach);
    const sale = coach.getByRole("row").filter({ hasText: "Ada Okafor" });
    await sale.getByTestId("sale-status").and(coach.locator("[data-status=fulfilled]")).waitFor();
    expect(await mutationsIn(coach, 1500)).toBeLessThan(5);
    await shot(coach, "coach-sales");

    // Keyboard: Enter opens the question with focus on the answer, Escape takes it back.
    await sale.getByRole("button", { name: "Refund" }).focus();
    await coach.keyboard.press("Enter");
    await expect.poll(() => coach.evaluate(() => document.activeElement?.textContent)).toBe("Yes, refund");
    await coach.keyboard.press("Escape");
    await sale.getByRole("button", { name: "Refund" }).waitFor();
    // Mouse: click Refund, then the confirmation.
    await sale.getByRole("button", { name: "Refund" }).click();
    await shot(coach, "coach-refund-confirm");
    await sale.getByRole("button", { name: "Yes, refund" }).click();
    await coach.getByText(/Refunded; \d+ future sessions? removed/).waitFor();
    await sale.locator("[data-testid=sale-status][data-status=refunded]").waitFor();
    await coach.reload();
    await coach.getByRole("row").filter({ hasText: "Ada Okafor" }).locator("[data-status=refunded]").waitFor();

    await athlete.goto(`${env.app.baseUrl}/athlete/calendar`);
    await ready(athlete);
    await linkFromOutbox(athlete, env.app.baseUrl, "ada@harbourline.example", "/athlete/calendar");
    await athlete.getByText("Your Pacewright refund: Spring build for sale").waitFor();
    await actx.close();

    // An edited listing shows its new price to the next buyer only; Ada's order keeps what she paid.
    const editRow = coach.getByTestId("listing-row").filter({ hasText: "Spring build for sale" });
    await editRow.getByRole("button", { name: "Edit" }).click();
    await editRow.getByLabel("Price (EUR)").fill("34.00");
    await editRow.getByRole("button", { name: "Save listing" }).click();
    await coach.getByText(/the next buyer sees €34.00; earlier orders keep their price/).waitFor();
    await coach.getByRole("row").filter({ hasText: "Ada Okafor" }).getByText("€29.50").waitFor();
    await shot(coach, "coach-listing-edited");

    const jctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const next = await jctx.newPage();
    await signInAs(next, env.app.baseUrl, "jonah@harbourline.example", "harbour-line-demo");
    await next.waitForURL(/\/athlete/);
    await next.goto(`${env.app.baseUrl}/shop`);
    await ready(next);
    await next.getByRole("link", { name: /Spring build for sale/ }).click();
    await ready(next);
    await next.getByRole("button", { name: "Buy for €34.00" }).waitFor();
    await shot(next, "listing-new-price");
    await jctx.close();
    await cctx.close();
  });

  it("a buyer with a plan already on those weeks sees the overlap and chooses before paying", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 390, height: 844 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await page.waitForURL(/\/athlete/);
    await page.goto(`${env.app.baseUrl}/shop`);
    await ready(page);
    await page.getByRole("link", { name: /Twelve-week road build/ }).click();
    await ready(page);
    const warning = page.getByTestId("overlap-warning");
    await warning.waitFor();
    await shot(page, "listing-overlap-phone");
    await warning.getByLabel(/start after it ends/).check();
    await page.getByRole("button", { name: /Buy for/ }).click();
    await page.waitForURL(/\/pay\/cs_test_/);
    const payPage = page.url();
    // Cancel, then come back to the pay page and pay anyway: the money is not lost, a person sees it.
    await page.getByRole("button", { name: "Cancel and go back" }).click();
    await page.locator("[data-testid=order-status][data-status=expired]").waitFor();
    await page.goto(payPage);
    await page.getByLabel("Card number").fill("4242 4242 4242 4242");
    await page.getByRole("button", { name: /^Pay/ }).click();
    await page.locator("[data-testid=order-status][data-status=needs_review]").waitFor();
    await shot(page, "order-needs-review-phone");

    const cctx = await env.browser.newContext({ viewport: { width: 390, height: 844 } });
    const coach = await cctx.newPage();
    await signInAs(coach, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    await coach.goto(`${env.app.baseUrl}/coach/shop`);
    await ready(coach);
    const item = coach.getByTestId("review-item").filter({ hasText: "Tomás Reyes" });
    await item.getByText(/Paid after the checkout had expired/).waitFor();
    await shot(coach, "coach-review-phone");
    await item.getByRole("button", { name: "Deliver the plan" }).click();
    await coach.getByText("Nothing waiting: every payment event matched its order.").waitFor();
    await coach.getByRole("row").filter({ hasText: "Tomás Reyes" }).locator("[data-status=fulfilled]").waitFor();
    await page.reload();
    await page.locator("[data-testid=order-status][data-status=fulfilled][data-placed=yes]").waitFor();
    await cctx.close();
    await ctx.close();
  });

  it("a buyer on another host name for the same machine comes back from paying still signed in", async () => {
    const other = env.app.baseUrl.replace("localhost", "127.0.0.1");
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    // Signed out, the shop has its own small header with the way to sign in.
    await page.goto(`${other}/shop`);
    await ready(page);
    await page.getByRole("link", { name: "Sign in" }).waitFor();
    await shot(page, "shop-signed-out");
    await signInAs(page, other, "jonah@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${other}/athlete`);
    await page.goto(`${other}/shop`);
    await ready(page);
    await page.getByRole("link", { name: /Twelve-week road build/ }).click();
    await page.waitForURL(/\/shop\/twelve-week-road-build-/);
    await ready(page);
    // Jonah runs and has no bike threshold: he is told before paying what his sessions will show.
    await page
      .getByTestId("needs-test-warning")
      .getByText(/no bike threshold yet/)
      .waitFor();
    await shot(page, "listing-needs-test");
    await page.getByRole("button", { name: /Buy for/ }).click();
    await page.waitForURL(/\/pay\/cs_test_/);
    await page.getByLabel("Card number").fill("4242 4242 4242 4242");
    await page.getByRole("button", { name: /^Pay/ }).click();
    await page.waitForURL(new RegExp(`^${other.replace(/[.]/g, "\\.")}/shop/orders/\\d+`));
    await page.locator("[data-testid=order-status][data-status=fulfilled][data-placed=yes]").waitFor();
    await page.getByRole("button", { name: "Sign out" }).waitFor();
    await ctx.close();
  });
});
