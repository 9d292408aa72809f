import { QueryTypes } from "sequelize";
import { db, dialect, sqlDate, writeTransaction } from "./db";

/** The work tables that share one claim: a `status`, an `attempts` count and a `next_attempt_at` per row. */
export type WorkTable = "jobs" | "outbound_emails";

/**
 * Claims up to `limit` due rows of a work table for this runner and answers their ids, oldest first. On PostgreSQL
 * one statement takes them with FOR UPDATE SKIP LOCKED, so several instances split the queue and never take one row
 * twice; on SQLite the single writer makes the same UPDATE … RETURNING atomic. The claim is a lease: it counts the
 * attempt and moves next_attempt_at `leaseMs` ahead, so the work of an instance that died mid-run is taken again
 * after that. Whoever settles a row checks `attempts` is still the claimed count (see the callers).
 */
export async function claimDueIds(
  table: WorkTable,
  opts: { limit: number; leaseMs: number; where?: string; replacements?: Record<string, unknown> },
): Promise<number[]> {
  const now = new Date();
  const skipLocked = dialect() === "postgres" ? "FOR UPDATE SKIP LOCKED" : "";
  const rows = await writeTransaction((transaction) =>
    db().query<{ id: number }>(
      `UPDATE ${table} SET attempts = attempts + 1, next_attempt_at = :lease, updated_at = :now
       WHERE id IN (SELECT id FROM ${table} WHERE status = 'pending' AND next_attempt_at <= :now
                    ${opts.where ? `AND ${opts.where}` : ""} ORDER BY id LIMIT :limit ${skipLocked})
       RETURNING id`,
      {
        replacements: {
          ...opts.replacements,
          now: sqlDate(now),
          lease: sqlDate(new Date(now.getTime() + opts.leaseMs)),
          limit: opts.limit,
        },
        type: QueryTypes.SELECT,
        transaction,
      },
    ),
  );
  return rows.map((r) => r.id).sort((a, b) => a - b);
}
