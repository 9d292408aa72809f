/** Responses that stop a loader or action early, with a message a person can act on. */
export function httpError(status: number, message: string): never {
  throw new Response(message, { status, headers: { "Content-Type": "text/plain; charset=utf-8" } });
}

export function notFound(what = "Not found"): never {
  httpError(404, what);
}

export function forbidden(why = "You do not have access to this page."): never {
  httpError(403, why);
}

/**
 * Only paths on this site may be a redirect target: "//evil.example" and "https://…" would send a freshly
 * signed-in user elsewhere.
 */
export function safeRedirect(to: FormDataEntryValue | string | null | undefined, fallback = "/"): string {
  if (typeof to !== "string" || !to.startsWith("/") || to.startsWith("//") || to.startsWith("/\\")) return fallback;
  try {
    const url = new URL(to, "http://local.invalid");
    if (url.host !== "local.invalid") return fallback;
    return url.pathname + url.search + url.hash;
  } catch {
    return fallback;
  }
}

/**
 * The page a request is for. Loaders and actions get the raw request (future.v8_passThroughRequests): a data
 * request (client navigation, fetcher) carries React Router's `.data` suffix (`_.data` after a trailing slash,
 * future.v8_trailingSlashAwareDataRequests) and its `_routes` and empty `index` parameters. Routes have the same
 * address as their `url` argument; this is for helpers that get only the request (requireUser's way back after
 * sign-in), and strips them the way React Router 7.18's own normalisation does.
 */
export function pageUrl(request: Request): URL {
  const url = new URL(request.url);
  url.pathname = url.pathname.endsWith("/_.data") ? url.pathname.slice(0, -6) : url.pathname.replace(/\.data$/, "");
  url.searchParams.delete("_routes");
  const index = url.searchParams.getAll("index").filter(Boolean);
  url.searchParams.delete("index");
  for (const v of index) url.searchParams.append("index", v);
  return url;
}

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);
export const isSafeMethod = (method: string) => SAFE_METHODS.has(method.toUpperCase());

function sameOrigin(source: string, allowed: string[]) {
  if (source === "null") return false;
  try {
    return allowed.includes(new URL(source).origin);
  } catch {
    return false;
  }
}

/**
 * Whether a state-changing request may go on. Payment webhooks are signed server-to-server calls and always pass.
 * A request from another origin never passes. A request that carries the session cookie must also prove where it
 * comes from: a same-origin Origin header or `Sec-Fetch-Site: same-origin` (every current browser sends one of them
 * on a form post or fetch); without either it could be a request forged by something that holds the cookie jar but
 * is not our page. Requests without the cookie (a sign-in from a script) need no proof.
 */
export function isCrossSiteWrite(
  method: string,
  headers: {
    origin?: string | null;
    referer?: string | null;
    host?: string | null;
    secFetchSite?: string | null;
    hasSessionCookie?: boolean;
  },
  path: string,
  allowedOrigins: string[] = [],
) {
  if (isSafeMethod(method)) return false;
  if (path.startsWith("/webhooks/")) return false;
  const allowed = [...allowedOrigins];
  if (headers.host) allowed.push(`http://${headers.host}`, `https://${headers.host}`);
  if (headers.origin) return !sameOrigin(headers.origin, allowed);
  if (headers.secFetchSite) {
    if (headers.secFetchSite === "same-origin") return false;
    if (headers.secFetchSite !== "none") return true;
  }
  if (headers.hasSessionCookie) return true;
  // No Origin: an old client or a script. A Referer from elsewhere still gives a cross-site request away.
  if (headers.referer) return !sameOrigin(headers.referer, allowed);
  return false;
}

/** Throws 403 unless a cookie-authenticated write comes from one of our own pages (see isCrossSiteWrite). */
export function requireSameOrigin(request: Request, appUrl: string) {
  if (isSafeMethod(request.method)) return;
  const url = new URL(request.url);
  const h = request.headers;
  const refused = isCrossSiteWrite(
    request.method,
    {
      origin: h.get("origin"),
      referer: h.get("referer"),
      secFetchSite: h.get("sec-fetch-site"),
      hasSessionCookie: true,
    },
    url.pathname,
    [url.origin, new URL(appUrl).origin],
  );
  if (refused) forbidden("Refused: this change did not come from a Pacewright page. Reload the page and try again.");
}

/** JSON resource routes read only JSON: a form or text body from another page answers 415 before anything runs. */
export function requireJson(request: Request) {
  const type = (request.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  if (type !== "application/json") {
    throw Response.json(
      { error: "Send this as JSON (Content-Type: application/json)." },
      { status: 415, headers: { "Cache-Control": "private, no-store" } },
    );
  }
}

/** JSON from a resource route: private to the signed-in user, never cached. */
export function jsonResponse(body: unknown, status = 200) {
  return Response.json(body, { status, headers: { "Cache-Control": "private, no-store" } });
}
