import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("forms say what is wrong and stop saying it once fixed", () => {
  const env = useApp({ beforeAll, afterAll });

  it("a new plan's missing name, and the week table's one Save with a bad figure", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/coach`);

    await page.goto(`${env.app.baseUrl}/coach/plans/new`);
    await ready(page);
    await page.getByRole("button", { name: "Create the plan" }).click();
    const nameError = page.getByText("Give the plan a name.");
    await nameError.waitFor();
    await page.getByLabel("Plan name").fill("Autumn block");
    await expect.poll(() => nameError.count()).toBe(0);

    await page.goto(`${env.app.baseUrl}/coach/plans/1`);
    await ready(page);
    expect(await page.getByRole("button", { name: /^Save/ }).count()).toBe(2); // the weeks, and the name
    const hours = page.getByLabel("Hours of week 2");
    const original = await hours.inputValue();
    await hours.fill("-3");
    await page.getByLabel("Notes for week 3").fill("Hill camp");
    await page.getByRole("button", { name: "Save all weeks" }).click();
    await page.getByText("Hours cannot be negative.").waitFor();
    await page.getByText("Nothing was saved: fix the marked fields.").waitFor();
    await hours.fill(original);
    await expect.poll(() => page.getByText("Hours cannot be negative.").count()).toBe(0);
    await page.getByRole("button", { name: "Save all weeks" }).click();
    await page.getByText("Saved 1 changed week.").waitFor();
    await page.reload();
    await ready(page);
    expect(await page.getByLabel("Notes for week 3").inputValue()).toBe("Hill camp");
    await shot(page, "plan-weeks");
    await ctx.close();
  });
});
