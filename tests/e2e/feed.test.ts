import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("calendar feed in the browser", () => {
  const env = useApp({ beforeAll, afterAll });

  it("the athlete makes a link, copies it, and the link serves the feed; turning it off gives 404", async () => {
    const ctx = await env.browser.newContext({ viewport: { width: 390, height: 844 } });
    await ctx.grantPermissions(["clipboard-read", "clipboard-write"], { origin: env.app.baseUrl });
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    await page.goto(`${env.app.baseUrl}/athlete/feed`);
    await ready(page);
    await page.getByRole("button", { name: "Make my calendar link" }).click();
    const web = page.getByLabel("Web link", { exact: true });
    await web.waitFor();
    const link = await web.inputValue();
    expect(link).toMatch(new RegExp(`^${env.app.baseUrl}/feed/[A-Za-z0-9_-]{43}\\.ics$`));
    expect(await page.getByLabel("Subscribe link", { exact: true }).inputValue()).toBe(
      link.replace(/^http:/, "webcal:"),
    );
    await page.getByRole("button", { name: "Copy" }).nth(1).click();
    await page.getByRole("button", { name: "Copied" }).waitFor();
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(link);
    await page.getByRole("img", { name: "QR code of the subscribe link" }).waitFor();
    await shot(page, "feed-settings-phone");

    const res = await fetch(link);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("text/calendar; charset=utf-8");
    const body = await res.text();
    expect(body.startsWith("BEGIN:VCALENDAR\r\n")).toBe(true);
    expect(body.replace(/\r\n /g, "")).toMatch(/DESCRIPTION:.*\d+(–\d+)? W/);

    // A usual training time makes that weekday's sessions timed events with a length.
    await page.getByLabel("Tuesday").fill("06:30");
    await page.getByRole("button", { name: "Save training times" }).click();
    await page.getByText(/Saved\. Sessions on those days get a start time/).waitFor();
    const timed = (await (await fetch(link)).text()).replace(/\r\n /g, "");
    expect(timed).toMatch(/DTSTART;TZID=[^:]+:\d{8}T063000\r\nDURATION:PT\d+M/);

    page.once("dialog", (d) => d.accept());
    await page.getByRole("button", { name: "Turn the link off" }).click();
    await page.getByText("The link is off.").waitFor();
    expect((await fetch(link)).status).toBe(404);
    await ctx.close();
  });
});
