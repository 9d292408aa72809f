import crypto from "node:crypto";

/** A URL-safe secret with 256 bits of entropy; only its hash is ever stored. */
export function newToken(): string {
  return crypto.randomBytes(32).toString("base64url");
}

export function hashToken(token: string): string {
  return crypto.createHash("sha256").update(token, "utf8").digest("hex");
}

/** Tokens we hand out are 43 base64url characters; anything else is refused before touching the database. */
export function looksLikeToken(token: string | undefined): token is string {
  return typeof token === "string" && /^[A-Za-z0-9_-]{43}$/.test(token);
}
