import crypto from "node:crypto";
import { feedLink, feedRateLimited, noteFeedUse, USE_NOTE_MS } from "~/.server/services/feed";
import { cachedFeed, feedFingerprint } from "~/.server/services/feed-cache";
import { REFRESH_SECONDS } from "~/.server/services/feed-calendar";
import { hashToken } from "~/.server/tokens";
import type { Route } from "./+types/feed";

// Calendar apps cannot sign in: the unguessable token in the URL is the credential. Every failure is the same
// plain 404, so a probe learns nothing about which tokens exist or were revoked.
const notFound = () =>
  new Response("Not found", {
    status: 404,
    headers: { "Content-Type": "text/plain; charset=utf-8", "Cache-Control": "no-store" },
  });

export async function loader({ request, params }: Route.LoaderArgs) {
  const file = params.file ?? "";
  if (!file.endsWith(".ics")) return notFound();
  const token = file.slice(0, -4);
  const link = await feedLink(token);
  const owner = link?.owner;
  if (!link || !owner || (owner.role !== "athlete" && owner.role !== "coach")) return notFound();
  const wait = await feedRateLimited(hashToken(token));
  if (wait !== null) {
    return new Response("Too many requests for this calendar link; try again in a few minutes.", {
      status: 429,
      headers: { "Retry-After": String(wait), "Content-Type": "text/plain; charset=utf-8" },
    });
  }
  // The link row just read says whether a note is due; most polls need no write at all.
  if (!link.lastUsedAt || Date.now() - link.lastUsedAt.getTime() >= USE_NOTE_MS) void noteFeedUse(hashToken(token));
  const fingerprint = await feedFingerprint(owner);
  const etag = `"${crypto.createHash("sha256").update(fingerprint).digest("base64url").slice(0, 32)}"`;
  const inm = request.headers.get("if-none-match");
  const baseHeaders = { "Cache-Control": `private, max-age=${Math.min(REFRESH_SECONDS, 900)}`, ETag: etag };
  if (
    inm &&
    inm
      .split(",")
      .map((t) => t.trim().replace(/^W\//, ""))
      .includes(etag)
  )
    return new Response(null, { status: 304, headers: baseHeaders });
  const { body, bytes, lastModified } = await cachedFeed(owner, fingerprint);
  const modified = new Date(Math.floor(lastModified.getTime() / 1000) * 1000);
  const headers = {
    ...baseHeaders,
    "Content-Type": "text/calendar; charset=utf-8",
    "Last-Modified": modified.toUTCString(),
    "Content-Disposition": 'inline; filename="pacewright.ics"',
  };
  const ims = request.headers.get("if-modified-since");
  if (!inm && ims && Date.parse(ims) >= modified.getTime()) return new Response(null, { status: 304, headers });
  return new Response(request.method === "HEAD" ? null : (bytes ?? body), { status: 200, headers });
}
