import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { browserAvailable, framesSettled, newPlanOnBoard, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

/** Drags with the mouse; `top` aims at the slot's label strip, so the drop lands on the day itself, not a card in it. */
async function dragTo(
  page: Page,
  from: ReturnType<Page["locator"]>,
  to: ReturnType<Page["locator"]>,
  aim: "center" | "top" = "center",
) {
  const a = (await from.boundingBox())!;
  const box = (await to.boundingBox())!;
  const b = aim === "top" ? { x: box.x, y: box.y, width: box.width, height: 12 } : box;
  await page.mouse.move(a.x + a.width / 2, a.y + a.height / 2);
  await page.mouse.down();
  // Small steps first so the pointer sensor's 5 px activation distance is passed, then glide to the target.
  await page.mouse.move(a.x + a.width / 2 + 10, a.y + a.height / 2 + 10, { steps: 4 });
  await page.mouse.move(b.x + b.width / 2, b.y + b.height / 2, { steps: 15 });
  await framesSettled(page);
  await page.mouse.up();
}

describe.skipIf(!enabled)("plan board in the browser", () => {
  const env = useApp({ beforeAll, afterAll });

  it("a coach drags sessions onto week 2 by mouse and keyboard, reorders a day, reloads, assigns; the athlete sees watts", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1600, height: 1000 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/coach`);

    // A fresh plan, so week 2 starts empty.
    const { planId, monday } = await newPlanOnBoard(page, env.app.baseUrl, "Board journey");
    const shelfCard = (name: string) => page.getByRole("button", { name: new RegExp(`^Shelf session ${name}`) });
    await shelfCard("Threshold repeats").waitFor();

    const tuesday = page.getByTestId("slot-2-1");
    const saved = () =>
      page.waitForResponse((r) => r.url().includes(`/api/plans/${planId}/items`) && r.request().method() === "POST");
    // Mouse: two sessions onto Tuesday of week 2.
    let s = saved();
    await dragTo(page, shelfCard("Threshold repeats"), tuesday, "top");
    expect((await s).status()).toBe(200);
    // Let the board settle on the server's answer before the next drag measures the slots.
    await expect.poll(() => tuesday.getByTestId("board-item").count()).toBe(1);
    await framesSettled(page);
    s = saved();
    await dragTo(page, shelfCard("Recovery spin"), tuesday, "top");
    expect((await s).status()).toBe(200);
    await expect.poll(() => tuesday.getByTestId("board-item").count()).toBe(2);

    // Keyboard: pick up a shelf session and walk it onto Monday of week 2 with one step right.
    const keyboardCard = shelfCard("Endurance 90");
    await keyboardCard.focus();
    s = saved();
    await page.keyboard.press("Space");
    await page.keyboard.press("ArrowRight");
    await expect.poll(() => page.getByTestId("slot-2-0").getByTestId("drop-marker").count()).toBe(1);
    await page.keyboard.press("Space");
    expect((await s).status()).toBe(200);
    await expect.poll(() => page.getByTestId("slot-2-0").getByTestId("board-item").count()).toBe(1);
    // The drawer moves it by keyboard too.
    const endurance = page.getByRole("button", { name: /^Endurance 90/ });
    await endurance.click();
    const drawer = page.getByRole("complementary", { name: "Selected session" });
    // The board ships no blocks: the drawer fetches them when the card opens.
    const blocks = drawer.getByRole("list", { name: "Blocks" });
    await expect.poll(() => blocks.getByRole("listitem").count()).toBeGreaterThan(0);
    expect(await blocks.innerText()).toMatch(/\d+ min at \d+/);
    await drawer.getByLabel("Move to week").selectOption({ label: "Week 2" });
    await drawer.getByLabel("Move to day").selectOption({ label: "Sat" });
    s = saved();
    await drawer.getByRole("button", { name: "Move", exact: true }).click();
    expect((await s).status()).toBe(200);
    await page.getByRole("button", { name: "Close details" }).click();
    await expect.poll(() => page.getByTestId("slot-2-5").getByTestId("board-item").count()).toBe(1);

    // The shelf search narrows the shelf through the board's own route; clearing it brings every session back.
    const shelfList = page.getByRole("list", { name: "Shelf sessions" });
    const everySession = await shelfList.getByRole("button").count();
    const search = page.getByRole("searchbox", { name: "Search the shelf" });
    await search.fill("recovery spin");
    await expect
      .poll(() => shelfList.getByRole("button").allInnerTexts())
      .toEqual([expect.stringContaining("Recovery spin")]);
    await search.fill("no session is called this");
    await expect.poll(() => shelfList.innerText()).toContain("No sessions match.");
    await search.fill("");
    await expect.poll(() => shelfList.getByRole("button").count()).toBe(everySession);
    expect(everySession).toBeGreaterThan(1);

    // Dropped on the day, a session goes last; dropped onto a card, it goes in before that card.
    const names = () =>
      tuesday
        .getByTestId("board-item")
        .evaluateAll((els) => els.map((e) => e.getAttribute("aria-label")!.split(",")[0]));
    expect(await names()).toEqual(["Threshold repeats", "Recovery spin"]);
    s = saved();
    await dragTo(
      page,
      tuesday.getByRole("button", { name: /^Recovery spin/ }),
      tuesday.getByRole("button", { name: /^Threshold repeats/ }),
    );
    expect((await s).status()).toBe(200);
    await expect.poll(names).toEqual(["Recovery spin", "Threshold repeats"]);
    await shot(page, "board");

    await page.reload();
    await ready(page);
    await expect.poll(names).toEqual(["Recovery spin", "Threshold repeats"]);
    expect(await page.getByTestId("slot-2-5").getByTestId("board-item").count()).toBe(1);

    // Assign to the demo road cyclist from the plan's start.
    await page.getByRole("link", { name: "Assign to athletes" }).click();
    await page.waitForURL(/assign$/);
    await ready(page);
    await page.getByLabel("Tomás Reyes").check();
    await page.getByLabel("start on the Monday on or after").check();
    await page.getByLabel("Start date").fill(monday);
    await page.getByRole("button", { name: "Place on calendars" }).click();
    // Tomás already follows the demo season in these weeks: nothing is written until the coach chooses.
    const checks = page.getByTestId("placement-checks");
    await checks.getByText(/already has \d+ planned sessions?/).waitFor();
    await checks.getByLabel("replace them from").check();
    await checks.getByLabel("Replace from").fill(monday);
    await checks.getByRole("button", { name: "Place with these choices" }).click();
    await page.getByText(/Placed \d+ sessions for Tomás Reyes/).waitFor();
    await ctx.close();

    // The athlete sees his own watts on the calendar in week 2.
    const actx = await env.browser.newContext({ viewport: { width: 390, height: 844 } });
    const athlete = await actx.newPage();
    await signInAs(athlete, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await athlete.waitForURL(`${env.app.baseUrl}/athlete`);
    await athlete.goto(`${env.app.baseUrl}/athlete/calendar`);
    await ready(athlete);
    const weekTwoTuesday = await athlete.evaluate((m) => {
      const d = new Date(`${m}T00:00:00Z`);
      d.setUTCDate(d.getUTCDate() + 8);
      return d.toISOString().slice(0, 10);
    }, monday);
    // Step forward until week 2 of the plan is in view.
    for (let i = 0; i < 3 && (await athlete.getByTestId(`day-${weekTwoTuesday}`).count()) === 0; i++) {
      const first = await athlete.locator("[data-day]").first().getAttribute("data-day");
      await athlete.getByRole("link", { name: "Later weeks" }).click();
      await expect.poll(() => athlete.locator("[data-day]").first().getAttribute("data-day")).not.toBe(first);
    }
    const day = athlete.getByTestId(`day-${weekTwoTuesday}`);
    await day.getByText("Threshold repeats").waitFor();
    // 95–99 % of the demo threshold of 262 W: 249–259 W.
    await day.getByText("4 × 8 min at 249–259 W, 4 min at 131 W between").waitFor();
    await shot(athlete, "athlete-calendar-phone");
    await actx.close();
  });
});
