import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("session builder blocks", () => {
  const env = useApp({ beforeAll, afterAll });

  it("reorders blocks by the handle with the mouse and with the keyboard; a bad duration says so and never shows NaN", async () => {
    // A short window, so the blocks sit below the fold and the page is scrolled while dragging.
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 600 } });
    const page = await ctx.newPage();
    const errors: string[] = [];
    page.on("console", (m) => m.type() === "error" && errors.push(m.text()));
    await signInAs(page, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/coach`);
    await page.goto(`${env.app.baseUrl}/coach/sessions`);
    await ready(page);
    await page.getByRole("link", { name: "Threshold repeats" }).first().click();
    await page.waitForURL(/\/coach\/sessions\/\d+$/);
    await ready(page);
    const kinds = () => page.getByTestId("block").evaluateAll((els) => els.map((e) => e.getAttribute("data-kind")));
    // The URL changes before React has drawn the new page (router updates render in a transition): wait for it.
    await expect.poll(kinds).toEqual(["warmup", "repeats", "cooldown"]);

    await page.getByTestId("block").nth(2).scrollIntoViewIfNeeded();
    const from = (await page.getByRole("button", { name: /^Move block 1,/ }).boundingBox())!;
    const to = (await page.getByRole("button", { name: /^Move block 3,/ }).boundingBox())!;
    await page.mouse.move(from.x + from.width / 2, from.y + from.height / 2);
    await page.mouse.down();
    await page.mouse.move(from.x + from.width / 2, from.y + from.height / 2 + 10, { steps: 3 });
    await page.mouse.move(to.x + to.width / 2, to.y + to.height / 2 + 5, { steps: 15 });
    await page.mouse.up();
    await expect.poll(kinds).toEqual(["repeats", "cooldown", "warmup"]);

    // Keyboard: Space lifts block 3, ArrowUp twice, Space drops it first.
    const live = page.locator('[id^="DndLiveRegion"]');
    await page.getByRole("button", { name: /^Move block 3,/ }).focus();
    await page.keyboard.press("Space");
    await page.keyboard.press("ArrowUp");
    await page.keyboard.press("ArrowUp");
    await expect.poll(() => live.textContent()).toContain("over position 1");
    await page.keyboard.press("Space");
    await expect.poll(kinds).toEqual(["warmup", "repeats", "cooldown"]);
    // Escape leaves the order alone.
    await page.getByRole("button", { name: /^Move block 1,/ }).focus();
    await page.keyboard.press("Space");
    await page.keyboard.press("ArrowDown");
    await page.keyboard.press("Escape");
    await expect.poll(() => live.textContent()).toContain("cancelled");
    expect(await kinds()).toEqual(["warmup", "repeats", "cooldown"]);

    // A duration that is not a time: a message beside the field, no figure built from it, no drawing errors.
    const duration = page.getByLabel("Block 1 duration");
    await duration.fill("abc");
    await page.getByText("Use m:ss or h:mm:ss.").waitFor();
    await page.getByText("The profile returns once the highlighted fields are fixed.").waitFor();
    expect(await page.locator("body").innerText()).not.toContain("NaN");
    await shot(page, "builder-bad-duration");
    // Fixed, the message goes and the figures come back.
    await duration.fill("12:00");
    await expect.poll(() => page.getByText("Use m:ss or h:mm:ss.").count()).toBe(0);
    await page.getByTestId("estimates").waitFor();
    // An empty repeat count also gets its own message.
    await page.getByLabel("Block 2 repeat count").fill("");
    await expect.poll(() => page.getByLabel("Block 2 repeat count").getAttribute("aria-invalid")).toBe("true");
    expect(await page.locator("body").innerText()).not.toContain("NaN");
    expect(errors.filter((e) => /NaN|attribute/.test(e))).toEqual([]);
    await ctx.close();
  });
});
