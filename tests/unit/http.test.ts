import { describe, expect, it } from "vitest";
import { isCrossSiteWrite, pageUrl, safeRedirect } from "~/.server/http";
import { looksLikeToken, newToken, hashToken } from "~/.server/tokens";

describe("safeRedirect", () => {
  it.each([
    ["/coach", "/coach"],
    ["/coach?x=1#y", "/coach?x=1#y"],
    ["//evil.example", "/"],
    ["/\\evil.example", "/"],
    ["https://evil.example/", "/"],
    ["javascript:alert(1)", "/"],
    ["", "/"],
    [null, "/"],
  ])("%s → %s", (input, expected) => {
    expect(safeRedirect(input as string | null)).toBe(expected);
  });
});

// The data-request addresses are React Router 7.18's (single fetch with trailing-slash-aware data requests); the
// expected pages are what its own normalisation (getNormalizedPath, stripIndexParam) hands loaders without
// future.v8_passThroughRequests.
describe("pageUrl", () => {
  it.each([
    ["/coach/plans", "/coach/plans"],
    ["/coach/plans.data", "/coach/plans"],
    ["/coach/plans.data?_routes=routes%2Fcoach%2Fplans", "/coach/plans"],
    ["/_.data", "/"],
    ["/shop/_.data?sport=bike", "/shop/?sport=bike"],
    ["/coach/athletes/7/calendar.data?from=2026-03-02&_routes=root", "/coach/athletes/7/calendar?from=2026-03-02"],
    ["/coach.data?index", "/coach"],
    ["/coach?index=&index=kept", "/coach?index=kept"],
  ])("%s → %s", (raw, page) => {
    const url = pageUrl(new Request(`http://localhost:3999${raw}`));
    expect(url.pathname + url.search).toBe(page);
  });
});

describe("isCrossSiteWrite", () => {
  const host = "localhost:3000";
  it("asks a cookie-authenticated write for a same-origin Origin or Sec-Fetch-Site", () => {
    const cookie = { host, hasSessionCookie: true };
    expect(isCrossSiteWrite("POST", cookie, "/coach")).toBe(true);
    expect(isCrossSiteWrite("POST", { ...cookie, referer: "http://localhost:3000/coach" }, "/coach")).toBe(true);
    expect(isCrossSiteWrite("POST", { ...cookie, origin: "http://localhost:3000" }, "/coach")).toBe(false);
    expect(isCrossSiteWrite("POST", { ...cookie, secFetchSite: "same-origin" }, "/coach")).toBe(false);
    expect(isCrossSiteWrite("POST", { ...cookie, secFetchSite: "same-site" }, "/coach")).toBe(true);
    expect(isCrossSiteWrite("POST", { ...cookie, secFetchSite: "cross-site" }, "/coach")).toBe(true);
    expect(
      isCrossSiteWrite("POST", { ...cookie, origin: "https://pacewright.example" }, "/coach", [
        "https://pacewright.example",
      ]),
    ).toBe(false);
    expect(isCrossSiteWrite("POST", cookie, "/webhooks/payments")).toBe(false);
    expect(isCrossSiteWrite("GET", cookie, "/coach")).toBe(false);
  });
  it("lets reads and same-site writes through", () => {
    expect(isCrossSiteWrite("GET", { origin: "https://evil.example", host }, "/coach")).toBe(false);
    expect(isCrossSiteWrite("POST", { origin: "http://localhost:3000", host }, "/login")).toBe(false);
    expect(isCrossSiteWrite("POST", { referer: "http://localhost:3000/login", host }, "/login")).toBe(false);
    expect(isCrossSiteWrite("POST", { host }, "/login")).toBe(false);
  });
  it("refuses writes from another origin, an opaque origin, or a garbled header", () => {
    expect(isCrossSiteWrite("POST", { origin: "https://evil.example", host }, "/logout")).toBe(true);
    expect(isCrossSiteWrite("DELETE", { origin: "http://localhost:3001", host }, "/api/x")).toBe(true);
    expect(isCrossSiteWrite("POST", { origin: "null", host }, "/login")).toBe(true);
    expect(isCrossSiteWrite("POST", { referer: "::::", host }, "/login")).toBe(true);
  });
  it("exempts signed payment webhooks", () => {
    expect(isCrossSiteWrite("POST", { origin: "https://pay.example", host }, "/webhooks/payments")).toBe(false);
  });
});

describe("tokens", () => {
  it("are 43 URL-safe characters with a 64-hex SHA-256 hash", () => {
    const t = newToken();
    expect(looksLikeToken(t)).toBe(true);
    expect(hashToken(t)).toMatch(/^[0-9a-f]{64}$/);
    expect(newToken()).not.toBe(t);
    expect(looksLikeToken("../../etc/passwd")).toBe(false);
  });
});
