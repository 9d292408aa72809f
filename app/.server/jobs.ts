import type { Transaction } from "sequelize";
import { claimDueIds } from "./claims";
import { db, sqlDate, writeTransaction } from "./db";
import { Job } from "./models";

/*
 * BACKGROUND JOBS, CLAIMED ONCE ACROSS INSTANCES
 *
 * A job is a row in `jobs` with a unique key naming the work ("order:12:place"). Whoever causes the work enqueues
 * it inside its own transaction, so the job exists exactly when the cause committed; enqueuing the same key again
 * finds the row already there. Every app instance runs a runner that claims due rows with `claimDueIds` (claims.ts,
 * shared with the mail outbox): several instances split the queue and never take one row twice. A claim is a
 * lease: it moves the row's next_attempt_at LEASE_MS ahead, so work of an instance that died mid-job is taken again
 * after that.
 *
 * The handler runs in a write transaction that also marks the row done, on the condition that the row still
 * carries this claim's attempt count; if the lease ran out and another runner claimed it meanwhile, this run rolls
 * back. Handlers also lock their own record (the order row) and check their own marks, so the effect happens once
 * even then. A failed run is retried with exponential backoff; after MAX_ATTEMPTS the row is `failed` and the
 * handler's giveUp leaves a state a person sees (an order in review).
 */

export const JOB_MAX_ATTEMPTS = 5;
const LEASE_MS = 120_000;

/** 5 s, 10 s, 20 s, 40 s … capped at ten minutes (common practice: exponential backoff). */
export function jobBackoffMs(attempt: number) {
  return Math.min(600_000, 5_000 * 2 ** Math.max(0, attempt - 1));
}

export interface JobHandler {
  run(job: Job, transaction: Transaction): Promise<void>;
  /** Called once, outside any transaction, when the last attempt failed. */
  giveUp?(job: Job, error: string): Promise<void>;
}
export type JobHandlers = Record<string, JobHandler>;

/**
 * Adds a job inside the caller's transaction. A key already pending stays as it is (one row, one run); a key whose
 * row is done or failed is armed again, because the cause arose again (a coach delivering an order whose placement
 * had given up). Handlers check their own marks, so a re-armed job with nothing left to do does nothing.
 */
export async function enqueueJob(
  job: { kind: string; key: string; orderId?: number | null },
  transaction: Transaction,
) {
  const now = sqlDate(new Date());
  await db().query(
    `INSERT INTO jobs (kind, job_key, order_id, status, attempts, next_attempt_at, created_at, updated_at)
     VALUES (:kind, :key, :orderId, 'pending', 0, :now, :now, :now)
     ON CONFLICT (job_key) DO UPDATE SET status = 'pending', attempts = 0, next_attempt_at = excluded.next_attempt_at,
       last_error = NULL, done_at = NULL, updated_at = excluded.updated_at
     WHERE jobs.status <> 'pending'`,
    { replacements: { kind: job.kind, key: job.key, orderId: job.orderId ?? null, now }, transaction },
  );
  transaction.afterCommit(() => kickJobs());
}

/** Claims up to `limit` due jobs (optionally of one order) for this runner; see the note at the top. */
async function claimDue(limit: number, orderId?: number): Promise<Job[]> {
  const ids = await claimDueIds("jobs", {
    limit,
    leaseMs: LEASE_MS,
    ...(orderId ? { where: "order_id = :orderId", replacements: { orderId } } : {}),
  });
  if (!ids.length) return [];
  return Job.findAll({ where: { id: ids }, order: [["id", "ASC"]] });
}

class LostClaim extends Error {}

/** Runs every due job once. Returns what happened, for tests and logs. */
export async function runDueJobs(handlers: JobHandlers, opts: { limit?: number; orderId?: number } = {}) {
  let done = 0;
  let failed = 0;
  let retried = 0;
  for (const job of await claimDue(opts.limit ?? 25, opts.orderId)) {
    const handler = handlers[job.kind];
    try {
      if (!handler) throw new Error(`No handler for jobs of kind "${job.kind}".`);
      await writeTransaction(async (transaction) => {
        await handler.run(job, transaction);
        const [n] = await Job.update(
          { status: "done", doneAt: new Date(), lastError: null },
          { where: { id: job.id, status: "pending", attempts: job.attempts }, transaction },
        );
        if (n !== 1) throw new LostClaim();
      });
      done++;
    } catch (err) {
      if (err instanceof LostClaim) continue;
      const message = String((err as Error).message ?? err).slice(0, 2000);
      const last = job.attempts >= JOB_MAX_ATTEMPTS;
      await Job.update(
        {
          status: last ? "failed" : "pending",
          lastError: message,
          nextAttemptAt: new Date(Date.now() + jobBackoffMs(job.attempts)),
        },
        { where: { id: job.id, attempts: job.attempts } },
      );
      if (last) {
        failed++;
        console.error(`[jobs] ${job.jobKey} failed ${job.attempts} times, giving up: ${message}`);
        await handler
          ?.giveUp?.(job, message)
          .catch((e) => console.error(`[jobs] ${job.jobKey}: giving up failed too:`, e));
      } else {
        retried++;
        console.warn(`[jobs] ${job.jobKey} failed (attempt ${job.attempts}), retrying later: ${message}`);
      }
    }
  }
  return { done, failed, retried };
}

declare global {
  var __pacewrightJobs:
    { handlers: JobHandlers; timer: NodeJS.Timeout | null; busy: boolean; again: boolean } | undefined;
}

async function runLoop() {
  const state = globalThis.__pacewrightJobs;
  if (!state) return;
  if (state.busy) {
    state.again = true;
    return;
  }
  state.busy = true;
  try {
    do {
      state.again = false;
      const r = await runDueJobs(state.handlers);
      // A full batch means more may be due right now.
      if (r.done + r.failed + r.retried >= 25) state.again = true;
    } while (state.again && state.timer);
  } catch (err) {
    console.error("[jobs] run failed:", err);
  } finally {
    state.busy = false;
  }
}

/**
 * Starts this instance's runner: it polls every `intervalMs` (jobs enqueued by another instance, retries that came
 * due) and runs at once after a job is enqueued here, so a paid order lands on the calendar without waiting.
 */
export function startJobRunner(handlers: JobHandlers, intervalMs = Number(process.env.JOB_POLL_MS ?? 1_000)) {
  if (globalThis.__pacewrightJobs?.timer) return;
  globalThis.__pacewrightJobs = { handlers, timer: null, busy: false, again: false };
  globalThis.__pacewrightJobs.timer = setInterval(runLoop, intervalMs);
  globalThis.__pacewrightJobs.timer.unref();
  void runLoop();
}

/** Stops the runner and waits for the job in progress, so a shutting-down instance finishes (or rolls back) it. */
export async function stopJobRunner(timeoutMs = 15_000) {
  const state = globalThis.__pacewrightJobs;
  if (!state) return;
  if (state.timer) clearInterval(state.timer);
  state.timer = null;
  const until = Date.now() + timeoutMs;
  while (state.busy && Date.now() < until) await new Promise((r) => setTimeout(r, 50));
  globalThis.__pacewrightJobs = undefined;
}

export function kickJobs() {
  if (globalThis.__pacewrightJobs?.timer) void runLoop();
}
