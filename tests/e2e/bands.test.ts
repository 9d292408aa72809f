import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();
const PASSWORD = "harbour-line-demo";

/**
 * Labels of the old scheme and of other programs that must never be shown: level and zone codes, letter-suffixed
 * zones, an author's name in a caption, the old level names, and proprietary load-metric abbreviations.
 */
const FORBIDDEN: [string, RegExp][] = [
  ["level or zone code", /\b(?:L[1-7]|Z[1-7][a-c]?|P[1-6])\b/],
  ["numbered level or zone", /\b(?:level|zone)s? [1-7]\b/i],
  ["author name", /Friel|Coggan/i],
  ["old level name", /\b(?:Tempo|Aerobic capacity|Anaerobic|Sprint|Sub-threshold|Sweet ?spot)\b/],
  ["old table title", /power levels|heart-rate zones|pace zones|minutes per level/i],
  ["proprietary metric", /\b(?:CTL|ATL|TSB|TSS|NP|IF)\b|Normali[sz]ed power|Training Stress/],
];

/** The page's rendered HTML without scripts, styles and attribute values that are not text (classes, paths, links). */
async function renderedText(page: Page) {
  return page.evaluate(() => {
    const body = document.body.cloneNode(true) as HTMLElement;
    body.querySelectorAll("script, style, noscript").forEach((e) => e.remove());
    const keep = new Set(["aria-label", "title", "alt", "placeholder", "value", "aria-description"]);
    body.querySelectorAll("*").forEach((el) => {
      for (const a of [...el.attributes]) if (!keep.has(a.name)) el.removeAttribute(a.name);
    });
    return body.outerHTML;
  });
}

/** Every page reachable from the signed-in navigation, at most two per URL shape (ids collapsed). */
async function crawl(page: Page, baseUrl: string, start: string[]) {
  const seen = new Set<string>();
  const shapes = new Map<string, number>();
  const queue = [...start];
  const visited: { url: string; html: string }[] = [];
  while (queue.length && visited.length < 60) {
    const url = queue.shift()!;
    if (seen.has(url)) continue;
    seen.add(url);
    const shape = url.replace(/\d+/g, "#").replace(/\?.*$/, "");
    if ((shapes.get(shape) ?? 0) >= 2) continue;
    shapes.set(shape, (shapes.get(shape) ?? 0) + 1);
    const res = await page.goto(`${baseUrl}${url}`);
    if (!res || res.status() >= 400) continue;
    await ready(page);
    visited.push({ url, html: await renderedText(page) });
    const links = await page.locator("a[href^='/']").evaluateAll((els) => els.map((e) => e.getAttribute("href")!));
    for (const l of links) {
      if (
        /^\/(coach|athlete|bands|admin)(\/|$|\?)/.test(l) &&
        !/\.(csv|ics)|format=csv|\/feed\/|\/api\//.test(l) &&
        !seen.has(l)
      )
        queue.push(l);
    }
  }
  return visited;
}

describe.skipIf(!enabled)("intensity bands in the browser", () => {
  const env = useApp({ beforeAll, afterAll });

  it("the label check catches the old scheme's wording (so the page check below can fail)", () => {
    for (const old of [
      "L4 Threshold",
      "Z5a Threshold",
      "Heart-rate zones for cycling (Friel)",
      "Minutes per level",
      "level 4 threshold",
      "Aerobic capacity",
      "Your power levels",
      "P3 Tempo",
    ]) {
      expect(
        FORBIDDEN.some(([, re]) => re.test(old)),
        old,
      ).toBe(true);
    }
    for (const ours of [
      "Easy",
      "Steady",
      "Heavy",
      "Ridge",
      "Severe",
      "Extreme",
      "Recovery week",
      "Power bands (cycling)",
      "Fitness (42-day)",
    ]) {
      expect(
        FORBIDDEN.some(([, re]) => re.test(ours)),
        ours,
      ).toBe(false);
    }
  });

  it("no signed-in page, as coach or athlete, shows an old level or zone label", async () => {
    const people: [string, string[]][] = [
      [
        "coach@harbourline.example",
        [
          "/coach",
          "/coach/sessions",
          "/coach/plans",
          "/coach/shop",
          "/coach/feed",
          "/coach/bands",
          "/coach/sessions/new",
          "/coach/plans/new",
          "/bands/about",
        ],
      ],
      [
        "tomas@harbourline.example",
        [
          "/athlete",
          "/athlete/calendar",
          "/athlete/tests",
          "/athlete/tests/new",
          "/athlete/load",
          "/athlete/uploads",
          "/athlete/feed",
          "/bands/about",
        ],
      ],
      ["jonah@harbourline.example", ["/athlete", "/athlete/tests", "/athlete/calendar", "/athlete/load"]],
    ];
    const problems: string[] = [];
    let pages = 0;
    for (const [email, start] of people) {
      const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
      const page = await ctx.newPage();
      await signInAs(page, env.app.baseUrl, email, PASSWORD);
      await page.waitForLoadState("networkidle");
      for (const { url, html } of await crawl(page, env.app.baseUrl, start)) {
        pages++;
        for (const [what, re] of FORBIDDEN) {
          const m = html.match(re);
          if (m)
            problems.push(
              `${email} ${url}: ${what} "${m[0]}" in …${html.slice(Math.max(0, m.index! - 60), m.index! + 60)}…`,
            );
        }
      }
      await ctx.close();
    }
    expect(pages).toBeGreaterThan(20);
    expect(problems).toEqual([]);
  });

  it("field-test and load pages show the bands and the new load picture, on desktop and phone", async () => {
    for (const [w, h, tag] of [
      [1280, 900, "desktop"],
      [390, 844, "phone"],
    ] as const) {
      const ctx = await env.browser.newContext({ viewport: { width: w, height: h } });
      const page = await ctx.newPage();
      await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", PASSWORD);
      await page.waitForURL(`${env.app.baseUrl}/athlete`);
      await page.goto(`${env.app.baseUrl}/athlete/tests`);
      await ready(page);
      const table = page.getByTestId("band-table").first();
      await table.waitFor();
      await expect.poll(() => table.locator("tr").count()).toBe(6);
      expect(await table.textContent()).toMatch(/Easy.*Steady.*Heavy.*Ridge.*Severe.*Extreme/s);
      await shot(page, `bands-tests-${tag}`);
      if (tag === "desktop") {
        // A power file uploaded on the ride files page (not attached to any session) must show in minutes per band.
        await page.goto(`${env.app.baseUrl}/athlete/uploads`);
        await ready(page);
        await page.getByLabel(/Ride file/).setInputFiles(path.resolve("db/demo/files/endurance-2h.csv"));
        await page.getByText("Added to your history.").waitFor({ timeout: 60_000 });
      }
      await page.goto(`${env.app.baseUrl}/athlete/load`);
      await ready(page);
      await page.getByTestId("readiness-note").waitFor();
      await page.locator("[data-testid=band-minutes-chart] .recharts-bar-rectangle").first().waitFor();
      await page.locator("[data-testid=weekly-load-chart] .recharts-bar-rectangle").first().waitFor();
      await page.locator("[data-testid=band-minutes-chart]").waitFor();
      expect(await page.locator("[data-testid=fitness-chart]").count()).toBe(0);
      // Nothing wider than the screen on a phone.
      if (tag === "phone")
        expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(w + 1);
      await shot(page, `bands-load-${tag}`);
      await ctx.close();
    }
  });

  it("the session page names each block's band, and the session builder counts minutes per band", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", PASSWORD);
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    const id = await page.evaluate(async () => {
      const iso = (x: Date) => x.toISOString().slice(0, 10);
      const from = new Date(Date.now() - 14 * 86_400_000);
      const to = new Date(Date.now() + 21 * 86_400_000);
      const body = await (await fetch(`/api/calendar?from=${iso(from)}&to=${iso(to)}`)).json();
      const list = body.sessions as { id: number; name: string }[];
      return (list.find((s) => /repeats|× /.test(s.name)) ?? list[0])?.id;
    });
    expect(id).toBeTruthy();
    await page.goto(`${env.app.baseUrl}/athlete/sessions/${id}`);
    await ready(page);
    await page.getByTestId("block-band").first().waitFor();
    for (const t of await page.getByTestId("block-band").allTextContents())
      expect(["Easy", "Steady", "Heavy", "Ridge", "Severe", "Extreme"]).toContain(t.trim());
    await shot(page, "bands-session");
    await ctx.close();

    const cctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const coach = await cctx.newPage();
    await signInAs(coach, env.app.baseUrl, "coach@harbourline.example", PASSWORD);
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    await coach.goto(`${env.app.baseUrl}/coach/sessions`);
    await ready(coach);
    await coach
      .getByRole("link", { name: /Threshold repeats/ })
      .first()
      .click();
    await coach.getByTestId("minutes-per-band").waitFor();
    expect(await coach.getByTestId("minutes-per-band").textContent()).toMatch(
      /Easy.*Steady.*Heavy.*Ridge.*Severe.*Extreme/s,
    );
    await shot(coach, "bands-builder");
    await cctx.close();
  });

  it("the band settings and the about page fit a phone", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 390, height: 844 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "coach@harbourline.example", PASSWORD);
    await page.waitForURL(`${env.app.baseUrl}/coach`);
    for (const [url, name] of [
      ["/coach/bands?set=run:pace", "bands-settings-phone"],
      ["/bands/about", "bands-about-phone"],
    ]) {
      await page.goto(`${env.app.baseUrl}${url}`);
      await ready(page);
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(391);
      await shot(page, name);
    }
    await ctx.close();
  });

  it("a coach edits the power bands: a gap is refused beside the field, a good set is saved, and the athlete's pages follow", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "coach@harbourline.example", PASSWORD);
    await page.waitForURL(`${env.app.baseUrl}/coach`);
    await page.goto(`${env.app.baseUrl}/coach/bands?set=bike:power`);
    await ready(page);
    const rows = page.getByTestId("band-rows").locator("li");
    await expect.poll(() => rows.count()).toBe(6);
    // Make a gap: band 3 starts at 85 while band 2 ends at 80.
    await rows.nth(2).getByLabel("From %").fill("85");
    await page.getByRole("button", { name: "Save bands" }).click();
    await rows
      .nth(2)
      .getByText(/Gap: the band above ends at 80 %/)
      .waitFor();
    await page.getByText("Nothing was saved").waitFor();
    await shot(page, "bands-settings-error");
    await rows.nth(2).getByLabel("From %").fill("80");
    await rows.nth(2).getByLabel("Name").fill("Solid");
    await page.getByRole("button", { name: "Save bands" }).click();
    await page.getByText("Saved. Your athletes see these bands").waitFor();
    await shot(page, "bands-settings-saved");
    await ctx.close();

    const actx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const athlete = await actx.newPage();
    await signInAs(athlete, env.app.baseUrl, "tomas@harbourline.example", PASSWORD);
    await athlete.waitForURL(`${env.app.baseUrl}/athlete`);
    await athlete.goto(`${env.app.baseUrl}/athlete/tests`);
    await ready(athlete);
    const table = athlete.getByTestId("band-table").first();
    await expect.poll(() => table.textContent()).toMatch(/Solid/);
    expect(await table.textContent()).not.toMatch(/Heavy/);
    expect(await athlete.getByText("your coach's bands").count()).toBeGreaterThan(0);
    await actx.close();

    // Restore defaults puts the athlete back.
    const rctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const coach = await rctx.newPage();
    await signInAs(coach, env.app.baseUrl, "coach@harbourline.example", PASSWORD);
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    await coach.goto(`${env.app.baseUrl}/coach/bands?set=bike:power`);
    await ready(coach);
    await coach.getByRole("button", { name: "Restore defaults" }).click();
    await coach.getByText("Back to Pacewright's default bands.").waitFor();
    await expect
      .poll(() => coach.getByTestId("band-rows").locator("li").nth(2).getByLabel("Name").inputValue())
      .toBe("Heavy");
    await rctx.close();
  });
});
