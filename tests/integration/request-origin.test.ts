import { describe, expect, it } from "vitest";
import { ShelfSession } from "~/.server/models";
import * as calendarApi from "~/routes/api/calendar";
import * as items from "~/routes/api/plan-items";
import * as preview from "~/routes/api/tests-preview";
import * as logout from "~/routes/logout";
import * as roster from "~/routes/coach/roster";
import * as feed from "~/routes/feed";
import { rotateFeed } from "~/.server/services/feed";
import { BASE, formRequest, makeUser, run, signIn, statusOf, uniqueEmail, withoutOrigin } from "./helpers";

describe("writes that rely on the session cookie", () => {
  it("answer 403 without Origin or Sec-Fetch-Site, and change nothing", async () => {
    const coach = await makeUser({ role: "coach" });
    const cookie = await signIn(coach.email);
    const invite = () =>
      new Request(`${BASE}/coach`, {
        method: "POST",
        body: new URLSearchParams({ intent: "invite", email: uniqueEmail("inv"), name: "X" }),
        headers: { Cookie: cookie, "Content-Type": "application/x-www-form-urlencoded" },
      });
    expect(statusOf(await run(roster.action, withoutOrigin(invite())))).toBe(403);
    const referer = withoutOrigin(invite());
    referer.headers.set("Referer", `${BASE}/coach`);
    expect(statusOf(await run(roster.action, referer))).toBe(403);
    const evil = invite();
    evil.headers.set("Origin", "https://evil.example");
    expect(statusOf(await run(roster.action, evil))).toBe(403);
    const fetchMeta = withoutOrigin(invite());
    fetchMeta.headers.set("Sec-Fetch-Site", "same-origin");
    expect(statusOf(await run(roster.action, fetchMeta))).not.toBe(403);
    // Signing out is a write too: without proof the session stays.
    const out = await run(
      logout.action,
      withoutOrigin(new Request(`${BASE}/logout`, { method: "POST", headers: { Cookie: cookie } })),
    );
    expect(statusOf(out)).toBe(403);
  });

  it("JSON resource routes answer 415 to text/plain and form bodies before anything runs", async () => {
    const coach = await makeUser({ role: "coach" });
    const coachCookie = await signIn(coach.email);
    const cookie = await signIn((await makeUser({ role: "athlete" })).email);
    const before = await ShelfSession.count();
    const json = JSON.stringify({ name: "Sneaky", sport: "bike", blocks: [] });
    for (const type of ["text/plain", "application/x-www-form-urlencoded", "multipart/form-data; boundary=x"]) {
      const res = (await run(
        calendarApi.action,
        new Request(`${BASE}/api/calendar`, {
          method: "POST",
          body: json,
          headers: { Cookie: cookie, "Content-Type": type },
        }),
      )) as Response;
      expect(res.status).toBe(415);
      expect((await res.json()).error).toMatch(/JSON/);
      expect(
        statusOf(
          await run(
            items.action,
            new Request(`${BASE}/api/plans/1/items`, {
              method: "POST",
              body: json,
              headers: { Cookie: coachCookie, "Content-Type": type },
            }),
            { planId: "1" },
          ),
        ),
      ).toBe(415);
      expect(
        statusOf(
          await run(
            preview.action,
            new Request(`${BASE}/api/tests/preview`, {
              method: "POST",
              body: json,
              headers: { Cookie: cookie, "Content-Type": type },
            }),
          ),
        ),
      ).toBe(415);
    }
    expect(await ShelfSession.count()).toBe(before);
  });

  it("leave calendar-feed reads and sign-in without a cookie alone", async () => {
    const athlete = await makeUser({ role: "athlete" });
    const token = await rotateFeed(athlete.id);
    const res = (await run(feed.loader, withoutOrigin(new Request(`${BASE}/feed/${token}.ics`)), {
      file: `${token}.ics`,
    })) as Response;
    expect(res.status).toBe(200);
    const { action } = await import("~/routes/login");
    const login = withoutOrigin(formRequest("/login", { email: athlete.email, password: "correct-horse-battery" }));
    login.headers.delete("Origin");
    expect(statusOf(await run(action, login))).toBe(302);
  });
});
