/** When a feed must be rebuilt (its fingerprint, which the ETag comes from) and the bodies kept between requests. */
import { LRUCache } from "lru-cache";
import { QueryTypes } from "sequelize";
import { db } from "../db";
import { CoachAthlete, User } from "../models";
import { addDays, todayIn } from "~/lib/dates";
import { buildFeed, FEED_DAYS_AHEAD, FEED_WEEKS_BACK } from "./feed-calendar";

declare global {
  var __pacewrightFeedCache: LRUCache<number, CachedFeed> | undefined;
  var __pacewrightFeedBuilds: Map<string, Promise<CachedFeed>> | undefined;
}

/**
 * A cheap summary of everything a feed shows: every change to a session (move, edit, rescale, status, cancel)
 * touches its row's updated_at and sequence, and new sessions change the count. The ETag is derived from it, so a
 * 304 needs one small query and no feed is rebuilt while nothing changed.
 */
export async function feedFingerprint(owner: User, now = new Date()) {
  const ids =
    owner.role === "coach"
      ? (await CoachAthlete.findAll({ where: { coachId: owner.id } })).map((l) => l.athleteId)
      : [owner.id];
  const today = todayIn(owner.timezone, now);
  // Band edits change event descriptions, so the band sets' count and latest change are part of it too; the band
  // owner is bandOwnerId's rule in SQL (a coach's own sets, an athlete's first coach's, no one else's). One
  // statement, because calendar apps poll often and each poll pays for every round trip.
  const bandOwner =
    owner.role === "coach"
      ? ":ownerId"
      : owner.role === "athlete"
        ? "(SELECT coach_id FROM coach_athletes WHERE athlete_id = :ownerId ORDER BY id LIMIT 1)"
        : "NULL";
  const [row] = await db().query<{
    n: number;
    m: unknown;
    q: number | null;
    u: unknown;
    bo: number | null;
    bn: number;
    bm: unknown;
  }>(
    `SELECT COUNT(*) AS n, MAX(s.updated_at) AS m, SUM(s.feed_sequence) AS q, (SELECT MAX(updated_at) FROM users WHERE id IN (:ids)) AS u,
            ${bandOwner} AS bo,
            (SELECT COUNT(*) FROM band_sets WHERE coach_id = ${bandOwner}) AS bn,
            (SELECT MAX(updated_at) FROM band_sets WHERE coach_id = ${bandOwner}) AS bm
     FROM scheduled_sessions s WHERE s.athlete_id IN (:ids) AND s.date BETWEEN :from AND :to`,
    {
      replacements: {
        ids: ids.length ? ids : [0],
        ownerId: owner.id,
        from: addDays(today, -FEED_WEEKS_BACK * 7),
        to: addDays(today, FEED_DAYS_AHEAD),
      },
      type: QueryTypes.SELECT,
    },
  );
  const stamp = (v: unknown) => (v instanceof Date ? v.toISOString() : v === null || v === undefined ? "-" : String(v));
  const bands = row.bo === null || row.bo === undefined ? "default" : `${Number(row.bn)}:${stamp(row.bm)}`;
  return [
    owner.id,
    owner.role,
    owner.timezone,
    owner.feedAlarmMinutes ?? "",
    owner.updatedAt.toISOString(),
    today,
    ids.join("."),
    row.n,
    stamp(row.m),
    row.q,
    stamp(row.u),
    bands,
  ].join("|");
}

/** The body also as UTF-8 bytes, encoded once per build rather than on every response. */
export type CachedFeed = { fingerprint: string; body: string; bytes?: Uint8Array<ArrayBuffer>; lastModified: Date };

/** Bodies kept across requests, bounded by their size in memory (UTF-16 text and bytes) rather than by a count of feeds. */
const FEED_CACHE_BYTES = 64 * 1024 * 1024;

function feedCache() {
  globalThis.__pacewrightFeedCache ??= new LRUCache<number, CachedFeed>({
    maxSize: FEED_CACHE_BYTES,
    sizeCalculation: (e) => e.body.length * 2 + (e.bytes?.byteLength ?? 0) + 256,
  });
  return globalThis.__pacewrightFeedCache;
}

/**
 * The feed body for its fingerprint, rebuilt only when the fingerprint moved on, and by one request at a time: the
 * calendar apps of a whole family polling at once after a plan change wait for the same rebuild.
 */
export async function cachedFeed(owner: User, fingerprint: string): Promise<CachedFeed> {
  const cache = feedCache();
  const hit = cache.get(owner.id);
  if (hit && hit.fingerprint === fingerprint) return hit;
  globalThis.__pacewrightFeedBuilds ??= new Map();
  const builds = globalThis.__pacewrightFeedBuilds;
  const key = `${owner.id}|${fingerprint}`;
  let pending = builds.get(key);
  if (!pending) {
    pending = buildFeed(owner)
      .then((built) => {
        const entry = {
          fingerprint,
          body: built.body,
          bytes: new TextEncoder().encode(built.body),
          lastModified: built.lastModified,
        };
        cache.set(owner.id, entry);
        return entry;
      })
      .finally(() => builds.delete(key));
    builds.set(key, pending);
  }
  return pending;
}
