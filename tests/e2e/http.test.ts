import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startApp, type RunningApp } from "./harness";

// Runs against the built server without a browser: compression and asset caching are the server's job.
describe("HTTP delivery of the built app", () => {
  let app: RunningApp;
  beforeAll(async () => {
    app = await startApp();
  });
  afterAll(async () => {
    await app?.stop();
  });

  it("compresses HTML, JS and CSS with brotli or gzip and caches hashed assets for a year", async () => {
    const page = await fetch(`${app.baseUrl}/`, { headers: { "Accept-Encoding": "br" } });
    expect(page.status).toBe(200);
    expect(page.headers.get("content-encoding")).toBe("br");
    const html = await page.text();
    const css = html.match(/href="(\/assets\/[^"]+\.css)"/)?.[1];
    const js = html.match(/(\/assets\/[^"]+\.js)/)?.[1];
    expect(css && js).toBeTruthy();
    for (const asset of [css!, js!]) {
      const res = await fetch(`${app.baseUrl}${asset}`, { headers: { "Accept-Encoding": "gzip" } });
      expect(res.status).toBe(200);
      expect(res.headers.get("content-encoding")).toBe("gzip");
      expect(res.headers.get("cache-control")).toMatch(/max-age=31536000.*immutable/);
      await res.arrayBuffer();
    }
    const plain = await fetch(`${app.baseUrl}/`, { headers: { "Accept-Encoding": "identity" } });
    expect(plain.headers.get("content-encoding")).toBeNull();
    await plain.text();
  });
});
