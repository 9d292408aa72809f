import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { browserAvailable, linkFromOutbox, ready, shot, signInAs, useApp } from "./harness";

const enabled = browserAvailable();

describe.skipIf(!enabled)("accounts in the browser", () => {
  const env = useApp({ beforeAll, afterAll });

  it("coach signs up and invites; the athlete accepts from the mail, signs out and back in", async () => {
    const coachEmail = `coach.${Date.now()}@example.test`;
    const athleteEmail = `rider.${Date.now()}@example.test`;

    const coachCtx = await env.browser.newContext({ viewport: { width: 1280, height: 800 } });
    const coach = await coachCtx.newPage();
    await coach.goto(`${env.app.baseUrl}/signup`);
    await ready(coach);
    // Bad input first: a short password is refused beside its field and nothing is created.
    await coach.getByLabel("Name").fill("Pat Coach");
    await coach.getByLabel("E-mail").fill(coachEmail);
    await coach.getByLabel("Password").fill("short");
    await coach.getByRole("button", { name: "Create account" }).click();
    await expect.poll(() => coach.getByText("Use at least 10 characters").count()).toBe(1);
    await coach.getByLabel("Password").fill("coach-password-123");
    await coach.getByRole("button", { name: "Create account" }).click();
    await coach.waitForURL(`${env.app.baseUrl}/coach`);
    await ready(coach);

    // Our palette and Lexend, as the design asks.
    const look = await coach.evaluate(async () => {
      await document.fonts.ready;
      return {
        bg: getComputedStyle(document.documentElement).backgroundColor,
        font: getComputedStyle(document.body).fontFamily,
        lexend: document.fonts.check("16px Lexend"),
      };
    });
    expect(look.bg).toBe("rgb(247, 244, 238)");
    expect(look.font).toMatch(/Lexend/);
    expect(look.lexend).toBe(true);

    await coach.getByLabel("E-mail").fill(athleteEmail);
    await coach.getByLabel("Name (optional)").fill("Robin Rider");
    await coach.getByRole("button", { name: "Send invitation" }).click();
    await coach.getByText(`Invitation sent to ${athleteEmail}`).waitFor();
    await coach.getByText("Robin Rider").waitFor();
    await shot(coach, "roster-with-invitation");

    // The athlete is someone else, on another device.
    const athleteCtx = await env.browser.newContext({ viewport: { width: 390, height: 844 } });
    const athlete = await athleteCtx.newPage();
    const link = await linkFromOutbox(athlete, env.app.baseUrl, athleteEmail, "/invite/");
    await athlete.goto(link);
    await ready(athlete);
    await athlete.getByRole("heading", { name: "Train with Pat Coach" }).waitFor();
    await athlete.getByLabel("Your name").fill("Robin Rider");
    await athlete.getByLabel("Choose a password").fill("rider-password-123");
    await athlete.getByRole("button", { name: "Accept and create my account" }).click();
    await athlete.waitForURL(/\/athlete$/);
    await athlete.getByText("You joined your coach's roster").waitFor();
    await athlete.getByText("Pat Coach").waitFor();
    await shot(athlete, "athlete-today-phone");

    await athlete.getByRole("button", { name: "Sign out" }).click();
    await athlete.waitForURL(`${env.app.baseUrl}/login`);
    await signInAs(athlete, env.app.baseUrl, athleteEmail, "wrong-password-1");
    await athlete.getByText("That e-mail and password do not match an account.").waitFor();
    await signInAs(athlete, env.app.baseUrl, athleteEmail, "rider-password-123");
    await athlete.waitForURL(`${env.app.baseUrl}/athlete`);

    await coach.reload();
    await coach.getByRole("link", { name: "Robin Rider" }).waitFor();
    await coach.getByText("None open.").waitFor();
    await coachCtx.close();
    await athleteCtx.close();
  });

  it("forgot password → reset link from the mail → sign in with the new password", async () => {
    const ctx = await env.browser.newContext();
    const page = await ctx.newPage();
    const email = "tomas@harbourline.example"; // a demo athlete
    await page.goto(`${env.app.baseUrl}/login`);
    await ready(page);
    await shot(page, "sign-in");
    await page.getByRole("link", { name: "Forgot your password?" }).click();
    await page.waitForURL(/forgot-password/);
    await page.getByLabel("E-mail").fill(email);
    await page.getByRole("button", { name: "Send the reset link" }).click();
    await page.getByText("a reset link is on its way").waitFor();

    const link = await linkFromOutbox(page, env.app.baseUrl, email, "/reset-password/");
    await page.goto(link);
    await ready(page);
    await page.getByLabel("New password").fill("fresh-password-456");
    await page.getByLabel("Repeat it").fill("different-password");
    await page.getByRole("button", { name: "Save the new password" }).click();
    await page.getByText("The two passwords differ.").waitFor();
    await page.getByLabel("New password").fill("fresh-password-456");
    await page.getByLabel("Repeat it").fill("fresh-password-456");
    await page.getByRole("button", { name: "Save the new password" }).click();
    await page.waitForURL(/\/login$/);
    await page.getByText("Your password was changed").waitFor();

    await signInAs(page, env.app.baseUrl, email, "fresh-password-456");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);

    // The link was single-use.
    await page.goto(link);
    await page.getByRole("heading", { name: "This link no longer works" }).waitFor();
    await ctx.close();
  });

  it("refuses a cross-site POST and gives an athlete 403 on coach pages", async () => {
    const res = await fetch(`${env.app.baseUrl}/forgot-password`, {
      method: "POST",
      headers: { Origin: "https://evil.example", "Content-Type": "application/x-www-form-urlencoded" },
      body: "email=tomas%40harbourline.example",
    });
    expect(res.status).toBe(403);
    expect(await res.text()).toMatch(/another site/);

    const ctx = await env.browser.newContext();
    const page = await ctx.newPage();
    await signInAs(page, env.app.baseUrl, "ada@harbourline.example", "harbour-line-demo");
    await page.waitForURL(`${env.app.baseUrl}/athlete`);
    const response = await page.goto(`${env.app.baseUrl}/coach`);
    expect(response?.status()).toBe(403);
    await page.getByTestId("app-error").getByRole("heading", { name: "Not for this account" }).waitFor();
    await ctx.close();
  });

  it("keeps the host the person opened: signed in on 127.0.0.1 while APP_URL says localhost", async () => {
    const { DEMO_ACCOUNTS } = await import("../../db/demo/accounts");
    const coach = DEMO_ACCOUNTS.people.find((p) => p.role === "coach")!;
    const other = env.app.baseUrl.replace("//localhost:", "//127.0.0.1:");
    expect(other).not.toBe(env.app.baseUrl);
    const ctx = await env.browser.newContext();
    const page = await ctx.newPage();
    await signInAs(page, other, coach.email, DEMO_ACCOUNTS.password);
    await page.waitForURL((url) => !url.pathname.startsWith("/login"));
    expect(new URL(page.url()).host).toBe(new URL(other).host);
    // A page behind sign-in on the same host still knows the session (the cookie belongs to 127.0.0.1 only).
    await page.goto(`${other}/coach/sessions`);
    await ready(page);
    expect(new URL(page.url())).toMatchObject({ host: new URL(other).host, pathname: "/coach/sessions" });
    await ctx.close();
  });
});
