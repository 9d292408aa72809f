import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, framesSettled, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("session shelf and season plans in the browser", () => {
  const env = useApp({ beforeAll, afterAll });

  it("a coach builds warm-up, 4 × 8 min repeats and cool-down by keyboard and mouse, saves, and finds it by search", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/coach`);
    await page.goto(`${env.app.baseUrl}/coach/sessions/new`);
    await ready(page);

    // Start from an empty list: delete the three default blocks.
    for (let i = 0; i < 3; i++) await page.getByRole("button", { name: "Delete block 1" }).click();
    await expect.poll(() => page.getByTestId("block").count()).toBe(0);

    await page.getByLabel("Name").fill("Threshold 4 × 8 keyboard");
    // Mouse: add the blocks in the wrong order.
    await page.getByRole("button", { name: "+ Cool-down" }).click();
    await page.getByRole("button", { name: "+ Warm-up" }).click();
    await page.getByRole("button", { name: "+ Repeats" }).click();
    await expect.poll(() => page.getByTestId("block").count()).toBe(3);

    // Keyboard: pick the cool-down up by its handle, move it down twice, drop it.
    const handle = page.getByRole("button", { name: "Move block 1, Cool-down" });
    await handle.focus();
    // dnd-kit measures between key presses, as it would for a person: each press is followed by its announcement.
    const live = page.locator('[id^="DndLiveRegion"]').first();
    const spoken = [
      /Picked up|is over position 1\./,
      /is over position 2/,
      /is over position 3/,
      /dropped at position 3/,
    ];
    for (const [i, key] of ["Space", "ArrowDown", "ArrowDown", "Space"].entries()) {
      await page.keyboard.press(key);
      await expect.poll(() => live.textContent()).toMatch(spoken[i]);
      await framesSettled(page);
    }
    const kinds = () => page.getByTestId("block").evaluateAll((els) => els.map((e) => (e as HTMLElement).dataset.kind));
    await expect.poll(kinds).toEqual(["warmup", "repeats", "cooldown"]);

    // Repeats: 4 × 8:00 at 95–99 %.
    await page.getByLabel("Block 2 repeat count").fill("4");
    await page.getByLabel("Block 2 work duration").fill("8:00");
    await page.getByLabel("Block 2 work low percent").fill("95");
    await page.getByLabel("Block 2 work high percent").fill("99");
    // A bad duration is flagged beside the field.
    await page.getByLabel("Block 1 duration").fill("15:75");
    await page.getByText("Use m:ss or h:mm:ss.").waitFor();
    await page.getByLabel("Block 1 duration").fill("15:00");

    const estimates = page.getByTestId("estimates");
    await expect.poll(() => estimates.textContent()).toMatch(/Duration\s*1:13:00/);
    await expect.poll(() => estimates.textContent()).toMatch(/Work\s*\d+ kJ/);
    await shot(page, "session-builder");

    await page.getByRole("button", { name: "Save to shelf" }).click();
    await page.waitForURL(/\/coach\/sessions\/\d+$/);
    await page.getByText("Saved to your shelf.").waitFor();

    await page.goto(`${env.app.baseUrl}/coach/sessions`);
    await ready(page);
    await page.getByLabel("Search").fill("keyboard");
    await expect.poll(() => page.locator("ul[aria-label=Sessions] > li").count()).toBe(1);
    await page.getByRole("link", { name: "Threshold 4 × 8 keyboard" }).waitFor();
    // The filter lives in the URL (the history entry is replaced, not added), so a reload keeps it.
    await page.waitForURL(`${env.app.baseUrl}/coach/sessions?q=keyboard`);
    await page.getByLabel("Sport").selectOption("run");
    await page.waitForURL(`${env.app.baseUrl}/coach/sessions?q=keyboard&sport=run`);
    await page.getByText("No sessions match.").waitFor();
    await page.reload();
    await ready(page);
    expect(await page.getByLabel("Search").inputValue()).toBe("keyboard");
    await page.getByLabel("Sport").selectOption("");
    await page.getByRole("link", { name: "Threshold 4 × 8 keyboard" }).waitFor();
    await shot(page, "shelf-search");
    await ctx.close();
  });

  it("creates a 16-week plan from an event date", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/coach`);
    await page.goto(`${env.app.baseUrl}/coach/plans/new`);
    await ready(page);
    await page.getByLabel("Plan name").fill("Gran fondo 2027");
    await page.getByLabel("Event date", { exact: true }).fill("2027-06-13");
    await page.getByLabel("Weeks", { exact: true }).fill("16");
    await page.getByText("16 weeks from Monday 2027-02-22, event on 2027-06-13.").waitFor();
    await page.getByRole("button", { name: "Create the plan" }).click();
    await page.waitForURL(/\/coach\/plans\/\d+$/);
    await page.getByRole("heading", { name: "Gran fondo 2027" }).waitFor();
    await expect.poll(() => page.locator("tbody tr").count()).toBe(16);
    await page.goto(`${env.app.baseUrl}/coach/plans`);
    await page.getByRole("link", { name: "Gran fondo 2027" }).waitFor();
    await ctx.close();
  });
});
