import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, linkFromOutbox, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("coach and athlete talk about a session where it happens", () => {
  const env = useApp({ beforeAll, afterAll });

  it("the athlete writes on a session from a phone, the coach gets the mail, answers on the athlete's session page; headings name the athlete", async () => {
    const actx = await env.browser.newContext({
      viewport: { width: 390, height: 844 },
      isMobile: true,
      hasTouch: true,
    });
    const athlete = await actx.newPage();
    await signInAs(athlete, env.app.baseUrl, "tomas@harbourline.example", "harbour-line-demo");
    await athlete.waitForURL(`${env.app.baseUrl}/athlete`);
    await athlete.goto(`${env.app.baseUrl}/athlete/calendar`);
    await ready(athlete);
    const link = athlete.getByTestId("calendar-session").getByRole("link").first();
    const href = (await link.getAttribute("href"))!;
    const sessionId = href.split("/").pop()!;
    await athlete.goto(env.app.baseUrl + href);
    await ready(athlete);
    await athlete.getByRole("heading", { name: "Talk about this session" }).waitFor();
    await athlete.getByRole("button", { name: "Send" }).click();
    await athlete.getByText("Write something first.").waitFor();
    await athlete.getByLabel(/^Message to/).fill("The last repeat was too hard to hold.");
    await expect.poll(() => athlete.getByText("Write something first.").count()).toBe(0);
    await athlete.getByRole("button", { name: "Send" }).click();
    await athlete.getByTestId("comment").getByText("The last repeat was too hard to hold.").waitFor();
    expect(await athlete.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await shot(athlete, "session-thread-phone");
    await actx.close();

    const ctx = await env.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const coach = await ctx.newPage();
    await signInAs(coach, env.app.baseUrl, "coach@harbourline.example", "harbour-line-demo");
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    // The notice reached the coach through the outbox, with a link to the athlete's session.
    const mailLink = await linkFromOutbox(
      coach,
      env.app.baseUrl,
      "coach@harbourline.example",
      `/sessions/${sessionId}`,
    );
    expect(mailLink).toMatch(new RegExp(`/coach/athletes/\\d+/sessions/${sessionId}$`));
    await coach.goto(mailLink!);
    await ready(coach);
    await coach.getByText("The last repeat was too hard to hold.").waitFor();
    expect(await coach.getByText(/^Your (power|heart-rate|pace)/).count()).toBe(0);
    expect(await coach.getByText(/^Tomás Reyes's /).count()).toBeGreaterThan(0);
    await coach.getByLabel("Message to Tomás Reyes").fill("Then hold 95 % next week.");
    await coach.getByRole("button", { name: "Send" }).click();
    await coach.getByTestId("comment").getByText("Then hold 95 % next week.").waitFor();
    await shot(coach, "session-thread-coach");
    await ctx.close();
  });
});
