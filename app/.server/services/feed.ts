/** Feed links: their tokens, who a link belongs to, noting a link in use, and the per-token request limit. */
import crypto from "node:crypto";
import { consume, LIMITS } from "../security/rate-limits";
import { DomainError } from "../errors";
import { literal, Op } from "sequelize";
import { db, writeTransaction } from "../db";
import { env } from "../env";
import { FeedToken, User } from "../models";
import { hashToken, looksLikeToken } from "../tokens";
import { parseSqlDate } from "./feed-calendar";

/** The link token is derived from a stored random salt and the server secret; only its hash is ever looked up. */
function tokenFor(salt: string) {
  return crypto.createHmac("sha256", env().sessionSecret).update(`feed:${salt}`).digest("base64url");
}

export async function activeFeed(userId: number) {
  const row = await FeedToken.findOne({ where: { userId, revokedAt: null }, order: [["id", "DESC"]] });
  return row
    ? {
        token: tokenFor(row.salt),
        createdAt: row.createdAt.toISOString(),
        lastUsedAt: row.lastUsedAt?.toISOString() ?? null,
      }
    : null;
}

/** A new link (32 random bytes); the old one, if any, stops working at once. */
export async function rotateFeed(userId: number) {
  return writeTransaction(async (transaction) => {
    await FeedToken.update({ revokedAt: new Date() }, { where: { userId, revokedAt: null }, transaction });
    const salt = crypto.randomBytes(32).toString("base64url");
    await FeedToken.create({ userId, salt, tokenHash: hashToken(tokenFor(salt)) }, { transaction });
    return tokenFor(salt);
  });
}

export async function revokeFeed(userId: number) {
  const [n] = await FeedToken.update({ revokedAt: new Date() }, { where: { userId, revokedAt: null } });
  return n;
}

export async function userForToken(token: string | undefined): Promise<User | null> {
  return (await feedLink(token))?.owner ?? null;
}

/** The owner of a live link and when the link was last noted in use (so a fresh note costs no write). */
export async function feedLink(token: string | undefined): Promise<{ owner: User; lastUsedAt: Date | null } | null> {
  if (!looksLikeToken(token)) return null;
  // One statement for the link and its owner: every poll pays for each round trip (and Sequelize's per-query cost).
  const link = `(SELECT %s FROM feed_tokens WHERE token_hash = ${db().escape(hashToken(token))} AND revoked_at IS NULL)`;
  const owner = await User.findOne({
    where: { id: { [Op.eq]: literal(link.replace("%s", "user_id")) } },
    attributes: { include: [[literal(link.replace("%s", "last_used_at")), "feedLastUsedAt"]] },
  });
  if (!owner) return null;
  const used = owner.getDataValue("feedLastUsedAt" as never) as unknown;
  // The owner goes on to code that knows only the user's own columns.
  delete (owner.dataValues as Record<string, unknown>).feedLastUsedAt;
  return {
    owner,
    lastUsedAt: used instanceof Date ? used : used === null || used === undefined ? null : parseSqlDate(String(used)),
  };
}

export const USE_NOTE_MS = 60 * 60 * 1000;

/**
 * Records that a feed link is in use, at most once an hour: calendar apps poll every few minutes, and a write on
 * every poll would cost more than answering it. Called only for requests the rate limit let through; best effort,
 * so a busy database never fails the feed.
 */
export function noteFeedUse(tokenHash: string, now = new Date()) {
  const stale = new Date(now.getTime() - USE_NOTE_MS);
  return FeedToken.update(
    { lastUsedAt: now },
    { where: { tokenHash, revokedAt: null, [Op.or]: [{ lastUsedAt: null }, { lastUsedAt: { [Op.lt]: stale } }] } },
  ).catch(() => undefined);
}

export function feedUrls(token: string) {
  const https = `${env().appUrl}/feed/${token}.ics`;
  return { https, webcal: https.replace(/^https?:/, "webcal:") };
}

export const FEED_RATE = { requests: LIMITS.feedToken.points, windowMs: LIMITS.feedToken.duration * 1000 };

/**
 * Per-token request limit, counted in the database so every app process shares it: calendar apps poll far less
 * often than this. Answers the seconds to wait, or null when the request may go on.
 */
export async function feedRateLimited(tokenHash: string): Promise<number | null> {
  try {
    await consume(["feedToken", tokenHash]);
    return null;
  } catch (err) {
    if (err instanceof DomainError && err.kind === "rate_limited") return err.retryAfterS ?? 1;
    throw err;
  }
}
