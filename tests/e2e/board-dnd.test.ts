import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { browserAvailable, newPlanOnBoard, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

/** "Tuesday 15 December" for a day of the plan, spelt as the board spells it. */
function spoken(monday: string, week: number, day: number) {
  const d = new Date(`${monday}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + (week - 1) * 7 + day);
  const long = ["Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"][day];
  return `${long} ${new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", timeZone: "UTC" }).format(d)}, week ${week}`;
}

async function coachOnBoard(browser: Browser, baseUrl: string, name: string) {
  const ctx = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const page = await ctx.newPage();
  const errors: string[] = [];
  page.on("console", (m) => m.type() === "error" && errors.push(m.text()));
  await signInAs(page, baseUrl, "coach@harbourline.example", "harbour-line-demo");
  await page.waitForURL(`${baseUrl}/coach`);
  const plan = await newPlanOnBoard(page, baseUrl, name);
  const saved = () =>
    page.waitForResponse((r) => r.url().includes(`/api/plans/${plan.planId}/items`) && r.request().method() === "POST");
  const shelfCard = (n: string) => page.getByRole("button", { name: new RegExp(`^Shelf session ${n}`) });
  await shelfCard("Threshold repeats").waitFor();
  const live = page.locator('[id^="DndLiveRegion"]');
  /** A card the server has confirmed (a card still waiting for its answer cannot be picked up yet). */
  const card = (week: number, day: number, n: string) =>
    page.getByTestId(`slot-${week}-${day}`).locator('[data-card-id]:not([data-card-id^="-"])').filter({ hasText: n });
  const names = (week: number, day: number) =>
    page
      .getByTestId(`slot-${week}-${day}`)
      .getByTestId("board-item")
      .evaluateAll((els) => els.map((e) => e.getAttribute("aria-label")!.split(",")[0]));
  return { ctx, page, errors, ...plan, saved, shelfCard, live, names, card };
}

describe.skipIf(!enabled)("plan board drag and drop lands exactly", () => {
  const env = useApp({ beforeAll, afterAll });

  it("builds a week by keyboard alone from the shelf, across two weeks, on the announced days; Escape cancels", async () => {
    const { ctx, page, errors, monday, saved, shelfCard, live, names, card } = await coachOnBoard(
      env.browser,
      env.app.baseUrl,
      "Keyboard season",
    );

    // Space picks up, two steps right cross two weeks, one step down reaches Tuesday.
    await shelfCard("Threshold repeats").focus();
    await page.keyboard.press("Space");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 1, 0)}`);
    await expect.poll(() => page.getByTestId("drop-marker").count()).toBe(1);
    await page.keyboard.press("ArrowRight");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 2, 0)}`);
    await page.keyboard.press("ArrowRight");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 3, 0)}`);
    await page.keyboard.press("ArrowDown");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 3, 1)}`);
    // The drop target is drawn where the session will go.
    expect(await page.getByTestId("slot-3-1").getByTestId("drop-marker").count()).toBe(1);
    await shot(page, "board-keyboard-target");
    let s = saved();
    await page.keyboard.press("Space");
    expect((await s).status()).toBe(200);
    await expect.poll(() => names(3, 1)).toEqual(["Threshold repeats"]);
    await expect.poll(() => live.textContent()).toContain(`placed on ${spoken(monday, 3, 1)}`);
    expect(await page.getByTestId("drop-marker").count()).toBe(0);

    // The next pick-up from the shelf starts where the last one landed: one step down passes the session, another reaches Wednesday.
    await shelfCard("Recovery spin").focus();
    await page.keyboard.press("Space");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 3, 1)}, after Threshold repeats`);
    await page.keyboard.press("ArrowDown");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 3, 2)}`);
    s = saved();
    await page.keyboard.press("Space");
    expect((await s).status()).toBe(200);
    await expect.poll(() => names(3, 2)).toEqual(["Recovery spin"]);

    // Up from Tuesday's top place goes back to Monday of the same week; then to Sunday of week 2 across the boundary.
    await shelfCard("Endurance 90").focus();
    await page.keyboard.press("Space");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 3, 2)}, after Recovery spin`);
    for (const [key, where] of [
      ["ArrowUp", `${spoken(monday, 3, 2)}, before Recovery spin`],
      ["ArrowUp", `${spoken(monday, 3, 1)}, after Threshold repeats`],
      ["ArrowUp", `${spoken(monday, 3, 1)}, before Threshold repeats`],
      ["ArrowUp", spoken(monday, 3, 0)],
      ["ArrowUp", spoken(monday, 2, 6)],
    ] as const) {
      await page.keyboard.press(key);
      await expect.poll(() => live.textContent()).toContain(`over ${where}`);
    }
    s = saved();
    await page.keyboard.press("Space");
    expect((await s).status()).toBe(200);
    await expect.poll(() => names(2, 6)).toEqual(["Endurance 90"]);

    // A session on the board: left moves to the same day a week earlier; the card keeps the focus for the next move.
    await card(3, 2, "Recovery spin").focus();
    await page.keyboard.press("Space");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 3, 2)}`);
    await page.keyboard.press("ArrowLeft");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 2, 2)}`);
    s = saved();
    await page.keyboard.press("Space");
    expect((await s).status()).toBe(200);
    await expect.poll(() => names(2, 2)).toEqual(["Recovery spin"]);
    expect(await names(3, 2)).toEqual([]);
    await expect
      .poll(() => page.evaluate(() => document.activeElement?.getAttribute("aria-label") ?? ""))
      .toMatch(/^Recovery spin/);

    // Reorder by keyboard: Threshold repeats goes before a second Tuesday session.
    await shelfCard("Recovery spin").focus();
    await page.keyboard.press("Space");
    // It starts where the last shelf session landed (Sunday, week 2).
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 2, 6)}, after Endurance 90`);
    await page.keyboard.press("ArrowRight");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 3, 6)}`);
    for (let i = 0; i < 5; i++) await page.keyboard.press("ArrowUp");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 3, 1)}, after Threshold repeats`);
    s = saved();
    await page.keyboard.press("Space");
    expect((await s).status()).toBe(200);
    await expect.poll(() => names(3, 1)).toEqual(["Threshold repeats", "Recovery spin"]);
    await card(3, 1, "Recovery spin").focus();
    await page.keyboard.press("Space");
    await page.keyboard.press("ArrowUp");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 3, 1)}, before Threshold repeats`);
    s = saved();
    await page.keyboard.press("Space");
    expect((await s).status()).toBe(200);
    await expect.poll(() => names(3, 1)).toEqual(["Recovery spin", "Threshold repeats"]);

    // Escape puts it back and sends nothing.
    let posted = 0;
    page.on("request", (r) => r.method() === "POST" && r.url().includes("/items") && posted++);
    await card(3, 1, "Threshold repeats").focus();
    await page.keyboard.press("Space");
    await page.keyboard.press("ArrowRight");
    await expect.poll(() => live.textContent()).toContain(`over ${spoken(monday, 4, 1)}`);
    await page.keyboard.press("Escape");
    await expect.poll(() => live.textContent()).toContain("Cancelled");
    expect(await page.getByTestId("drop-marker").count()).toBe(0);
    expect(await names(3, 1)).toEqual(["Recovery spin", "Threshold repeats"]);
    expect(await names(4, 1)).toEqual([]);
    expect(posted).toBe(0);

    // What the board shows is what the server kept.
    await page.reload();
    await ready(page);
    await expect.poll(() => names(3, 1)).toEqual(["Recovery spin", "Threshold repeats"]);
    expect(await names(2, 2)).toEqual(["Recovery spin"]);
    expect(await names(2, 6)).toEqual(["Endurance 90"]);
    expect(errors).toEqual([]);
    await ctx.close();
  });

  it("pointer drops land on the slot under the pointer, on 10 targets, also with the weeks scrolled sideways", async () => {
    const { ctx, page, saved, shelfCard, names } = await coachOnBoard(env.browser, env.app.baseUrl, "Pointer season");
    const weeks = page
      .getByRole("region", { name: "Weeks of the plan" })
      .or(page.locator('[aria-label="Weeks of the plan"]'));

    /** Presses on the source, glides to a point in the target's label strip and lets go there. */
    async function drop(from: ReturnType<Page["locator"]>, week: number, day: number) {
      const slot = page.getByTestId(`slot-${week}-${day}`);
      await slot.scrollIntoViewIfNeeded();
      const a = (await from.boundingBox())!;
      const b = (await slot.boundingBox())!;
      await page.mouse.move(a.x + a.width / 2, a.y + a.height / 2);
      await page.mouse.down();
      await page.mouse.move(a.x + a.width / 2 + 8, a.y + a.height / 2 + 8, { steps: 3 });
      await page.mouse.move(b.x + b.width * 0.7, b.y + 6, { steps: 12 });
      await expect
        .poll(() => slot.getByTestId("drop-marker").count())
        .toBe(1)
        .catch(async (e) => {
          await shot(page, "DEBUG-pointer");
          console.log(
            await page.evaluate(
              ([x, y]) => document.elementFromPoint(x, y)?.outerHTML.slice(0, 300),
              [b.x + b.width * 0.7, b.y + 6],
            ),
            a,
            b,
          );
          throw e;
        });
      const s = saved();
      await page.mouse.up();
      expect((await s).status()).toBe(200);
    }

    const targets: [number, number][] = [
      [1, 0],
      [1, 6],
      [2, 3],
      [2, 4],
      [3, 1],
      [4, 5],
      [5, 2],
      [6, 0],
      [7, 6],
      [8, 3],
    ];
    // A new plan already holds its test-week sessions.
    const seeded = await page.getByTestId("board-item").count();
    for (const [week, day] of targets) {
      const before = (await names(week, day)).length;
      // Weeks 5 to 8 sit beyond the right edge: the board is scrolled sideways before these drops.
      if (week >= 5) await weeks.first().evaluate((el) => (el.scrollLeft = el.scrollWidth));
      await drop(shelfCard("Recovery spin"), week, day);
      // Wait for the server's answer to replace the optimistic card (its figures can grow the week's header).
      await expect
        .poll(() => page.getByTestId(`slot-${week}-${day}`).locator('[data-card-id]:not([data-card-id^="-"])').count())
        .toBe(before + 1);
    }
    // Nothing landed anywhere else.
    const total = await page.getByTestId("board-item").count();
    expect(total).toBe(seeded + targets.length);
    expect(await weeks.first().evaluate((el) => el.scrollLeft)).toBeGreaterThan(0);

    // Onto the day's heading, a session joins the end of the day; onto the top half of a card, it goes before it.
    await drop(shelfCard("Threshold repeats"), 2, 3);
    await expect.poll(() => names(2, 3)).toEqual(["Recovery spin", "Threshold repeats"]);
    await expect
      .poll(() => page.getByTestId("slot-2-3").locator('[data-card-id]:not([data-card-id^="-"])').count())
      .toBe(2);
    const first = page.getByTestId("slot-2-3").getByRole("button", { name: /^Recovery spin/ });
    await page.getByTestId("slot-2-3").scrollIntoViewIfNeeded();
    const moving = page.getByTestId("slot-2-3").getByRole("button", { name: /^Threshold repeats/ });
    const a = (await moving.boundingBox())!;
    const b = (await first.boundingBox())!;
    await page.mouse.move(a.x + a.width / 2, a.y + a.height / 2);
    await page.mouse.down();
    await page.mouse.move(a.x + a.width / 2 + 8, a.y + a.height / 2 - 8, { steps: 3 });
    await page.mouse.move(b.x + b.width / 2, b.y + 4, { steps: 10 });
    const s = saved();
    await page.mouse.up();
    expect((await s).status()).toBe(200);
    await expect.poll(() => names(2, 3)).toEqual(["Threshold repeats", "Recovery spin"]);

    // A note for the athlete on one placed session, from the drawer; the card says it has one, and it stays.
    await page
      .getByTestId("slot-2-3")
      .getByRole("button", { name: /^Recovery spin/ })
      .click();
    const drawer = page.getByRole("complementary", { name: "Selected session" });
    await drawer.getByLabel("Note for the athlete").fill("Keep it truly easy.");
    const noted = saved();
    await drawer.getByRole("button", { name: "Save note" }).click();
    expect((await noted).status()).toBe(200);
    await page.getByTestId("slot-2-3").getByText("note", { exact: true }).waitFor();
    await page.reload();
    await ready(page);
    await page
      .getByTestId("slot-2-3")
      .getByRole("button", { name: /^Recovery spin/ })
      .click();
    expect(
      await page
        .getByRole("complementary", { name: "Selected session" })
        .getByLabel("Note for the athlete")
        .inputValue(),
    ).toBe("Keep it truly easy.");
    await ctx.close();
  });
});
