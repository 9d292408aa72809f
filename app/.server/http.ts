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

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Refuses state-changing requests sent by another site. Browsers send Origin on every cross-site POST;
 * a request without Origin or Referer comes from a non-browser client and cannot ride a user's cookie by accident.
 */
export function isCrossSiteWrite(method: string, headers: { origin?: string | null; referer?: string | null; host?: string | null }, path: string) {
  if (SAFE_METHODS.has(method.toUpperCase())) return false;
  // Payment webhooks are signed server-to-server calls.
  if (path.startsWith("/webhooks/")) return false;
  const source = headers.origin ?? headers.referer ?? null;
  if (!source) return false;
  if (source === "null") return true;
  try {
    return new URL(source).host !== headers.host;
  } catch {
    return true;
  }
}

/** JSON from a resource route: private to the signed-in user, never cached. */
export function jsonResponse(body: unknown, status = 200) {
  return Response.json(body, { status, headers: { "Cache-Control": "private, no-store" } });
}
