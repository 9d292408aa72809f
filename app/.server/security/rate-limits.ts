import crypto from "node:crypto";
import { QueryTypes } from "sequelize";
import { RateLimiterRes } from "rate-limiter-flexible";
import RateLimiterStoreAbstract from "rate-limiter-flexible/lib/RateLimiterStoreAbstract.js";
import type { RouterContextProvider } from "react-router";
import { clientAddressContext } from "./load-context";
import { db, writeStatement, writeTransaction } from "../db";
import { DomainError } from "../errors";

interface Row {
  points: number;
  expire: number | null;
}

/**
 * rate-limiter-flexible's store contract over our own `rate_limits` table through Sequelize. Every consume is one
 * `INSERT … ON CONFLICT DO UPDATE … RETURNING` statement, so parallel requests (from this process or another one
 * sharing the database) each get their own increment and none reads a stale count. The statement is plain SQL
 * that SQLite (3.35+) and PostgreSQL both run.
 */
class SqlRateLimiter extends RateLimiterStoreAbstract {
  constructor(opts: { keyPrefix: string; points: number; duration: number }) {
    // The store client is the shared Sequelize instance; the base class only checks that one is given.
    super({ ...opts, storeClient: "sequelize" });
  }

  // Each write is one statement, atomic without a transaction; it still queues in-process first (see
  // writeStatement): node-sqlite3 threads parked in SQLite's busy wait would otherwise starve the transaction that
  // holds the lock.
  private write<T>(fn: () => Promise<T>) {
    return writeStatement(fn);
  }

  async _upsert(rlKey: string, points: number, msDuration: number, forceExpire = false): Promise<Row> {
    const now = Date.now();
    const newExpire = msDuration > 0 ? now + msDuration : null;
    // The leading comment keeps Sequelize's SQLite dialect from treating this as a plain INSERT (which would drop
    // the RETURNING rows).
    const sql = forceExpire
      ? `/* rate limit */ INSERT INTO rate_limits (key, points, expire) VALUES (:key, :points, :expire)
         ON CONFLICT (key) DO UPDATE SET points = excluded.points, expire = excluded.expire
         RETURNING points, expire`
      : `/* rate limit */ INSERT INTO rate_limits (key, points, expire) VALUES (:key, :points, :expire)
         ON CONFLICT (key) DO UPDATE SET
           points = CASE WHEN rate_limits.expire IS NULL OR rate_limits.expire > :now THEN rate_limits.points + excluded.points ELSE excluded.points END,
           expire = CASE WHEN rate_limits.expire IS NULL OR rate_limits.expire > :now THEN rate_limits.expire ELSE excluded.expire END
         RETURNING points, expire`;
    const rows = await this.write(() =>
      db().query<Row>(sql, { replacements: { key: rlKey, points, expire: newExpire, now }, type: QueryTypes.SELECT }),
    );
    return normalize(rows[0]);
  }

  async _get(rlKey: string): Promise<Row | null> {
    const rows = await db().query<Row>(
      "SELECT points, expire FROM rate_limits WHERE key = :key AND (expire IS NULL OR expire > :now)",
      {
        replacements: { key: rlKey, now: Date.now() },
        type: QueryTypes.SELECT,
      },
    );
    return rows[0] ? normalize(rows[0]) : null;
  }

  async _delete(rlKey: string): Promise<boolean> {
    const [, changes] = (await this.write(() =>
      db().query("DELETE FROM rate_limits WHERE key = :key", { replacements: { key: rlKey } }),
    )) as [unknown, unknown];
    return typeof changes === "number" ? changes > 0 : true;
  }

  _getRateLimiterRes(_rlKey: string, changedPoints: number, result: Row) {
    const isFirstInDuration = changedPoints === result.points;
    const consumed = isFirstInDuration ? changedPoints : result.points;
    const msBeforeNext = result.expire ? Math.max(result.expire - Date.now(), 0) : -1;
    return new RateLimiterRes(Math.max(this.points - consumed, 0), msBeforeNext, consumed, isFirstInDuration);
  }
}

// PostgreSQL hands BIGINT back as text.
function normalize(row: Row): Row {
  return { points: Number(row.points), expire: row.expire == null ? null : Number(row.expire) };
}

const MINUTE = 60;
const HOUR = 3600;

/** Every limit in one table, so the numbers can be read and tuned together. Durations are in seconds. */
export const LIMITS = {
  // Failed sign-ins for one address: a success clears the count.
  signInAddress: {
    points: 10,
    duration: 15 * MINUTE,
    message: "Too many failed sign-ins for this address. Wait 15 minutes, or reset your password.",
  },
  // Failed sign-ins from one client, whatever the address: stops trying one password on many accounts.
  signInClient: {
    points: 30,
    duration: 15 * MINUTE,
    message: "Too many failed sign-ins from this network. Wait 15 minutes and try again.",
  },
  signUpAddress: {
    points: 5,
    duration: HOUR,
    message: "Too many sign-up attempts for this address. Try again in an hour.",
  },
  signUpClient: { points: 20, duration: HOUR, message: "Too many sign-ups from this network. Try again in an hour." },
  resetAddress: {
    points: 5,
    duration: HOUR,
    message: "Too many reset requests for this address. Check your inbox, or try again in an hour.",
  },
  resetClient: {
    points: 20,
    duration: HOUR,
    message: "Too many reset requests from this network. Try again in an hour.",
  },
  // Submitting a new password or accepting an invitation with a token from a link.
  tokenClient: {
    points: 30,
    duration: 15 * MINUTE,
    message: "Too many attempts from this network. Wait 15 minutes and try again.",
  },
  inviteToken: {
    points: 10,
    duration: 15 * MINUTE,
    message: "Too many attempts with this invitation. Wait 15 minutes and try again.",
  },
  twoStepUser: {
    points: 6,
    duration: 15 * MINUTE,
    message: "Too many wrong codes. Wait 15 minutes, or use a recovery code.",
  },
  feedToken: {
    points: 60,
    duration: 10 * MINUTE,
    message: "Too many requests for this calendar link; try again in a few minutes.",
  },
} as const;
export type LimitName = keyof typeof LIMITS;

declare global {
  var __pacewrightLimiters: Map<LimitName, SqlRateLimiter> | undefined;
}

function limiter(name: LimitName) {
  globalThis.__pacewrightLimiters ??= new Map();
  let found = globalThis.__pacewrightLimiters.get(name);
  if (!found) {
    const { points, duration } = LIMITS[name];
    found = new SqlRateLimiter({ keyPrefix: name, points, duration });
    globalThis.__pacewrightLimiters.set(name, found);
  }
  return found;
}

// Addresses and tokens are stored as digests: the table is about counting, not about who tried.
const digest = (key: string) =>
  crypto.createHash("sha256").update(key.trim().toLowerCase()).digest("base64url").slice(0, 32);

/**
 * Takes one point from every listed limit before the guarded work runs, so parallel requests cannot all slip in
 * before the first one is counted. Throws a "rate_limited" DomainError when any limit is used up.
 */
export async function consume(...limits: (readonly [LimitName, string])[]) {
  for (const [name, key] of limits) {
    try {
      await limiter(name).consume(digest(key));
    } catch (err) {
      if (err instanceof RateLimiterRes)
        throw new DomainError("rate_limited", LIMITS[name].message, {
          retryAfterS: Math.max(1, Math.ceil(err.msBeforeNext / 1000)),
        });
      throw err;
    }
  }
}

/** Like consume(), but answers a 429 with Retry-After for the route to throw. */
export async function consumeOr429(...limits: (readonly [LimitName, string])[]) {
  try {
    await consume(...limits);
  } catch (err) {
    if (err instanceof DomainError && err.kind === "rate_limited") tooMany(err);
    throw err;
  }
}

export function tooMany(err: DomainError): never {
  throw new Response(err.message, {
    status: 429,
    headers: { "Content-Type": "text/plain; charset=utf-8", "Retry-After": String(err.retryAfterS) },
  });
}

/** Forgets a key's count (a successful sign-in clears that address's failures). */
export async function clear(name: LimitName, key: string) {
  await limiter(name).delete(digest(key));
}

/** Gives back one point (a successful sign-in does not count against the client). */
export async function giveBack(name: LimitName, key: string) {
  // Not the library's reward(): on a key that has just expired it would insert a negative count.
  const rlKey = limiter(name).getKey(digest(key));
  await writeTransaction((transaction) =>
    db().query("UPDATE rate_limits SET points = points - 1 WHERE key = :key AND points > 0", {
      replacements: { key: rlKey },
      transaction,
    }),
  );
}

/** Points used so far in the current window (for tests and the admin view). */
export async function used(name: LimitName, key: string): Promise<number> {
  const res = await limiter(name).get(digest(key));
  return res?.consumedPoints ?? 0;
}

/**
 * The client a request comes from: the socket address the server saw (behind a local proxy, the forwarded one),
 * put in the load context by scripts/server.ts. Requests without one share a single bucket.
 */
export function clientKey(context: Readonly<RouterContextProvider> | undefined | null): string {
  return context?.get(clientAddressContext) || "unknown-client";
}

/** Deletes counters whose window ended; the server runs it hourly so the table holds only live windows. */
export async function clearExpiredLimits(now = Date.now()) {
  await writeTransaction((transaction) =>
    db().query("DELETE FROM rate_limits WHERE expire IS NOT NULL AND expire < :now", {
      replacements: { now },
      transaction,
    }),
  );
}

export function startLimitCleanup() {
  const timer = setInterval(
    () => void clearExpiredLimits().catch((err) => console.error("[limits] cleanup failed", err)),
    3600_000,
  );
  timer.unref();
  return () => clearInterval(timer);
}
