import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Piscina } from "piscina";
import type { ActivityLimits, ActivityTask, ActivityTaskResult } from "../workers/activity-task";
import { DomainError } from "../errors";

/**
 * Limits on reading ride files. A day-long event at one reading a second is 86,400 rows; a few more rows are
 * allowed for files that record faster than once a second.
 */
export const ACTIVITY_LIMITS: ActivityLimits & { parseMs: number; perUser: number; threads: number; queue: number } = {
  maxRows: 200_000,
  maxDurationS: 24 * 3600,
  // Wall time for one file, from the moment it is handed to the pool; past it the worker is stopped.
  parseMs: 20_000,
  // Files one person may have being read at once.
  perUser: 2,
  // Worker threads (the machine's cores are shared with the request thread and SQLite) and tasks that may wait.
  threads: 2,
  queue: 8,
};

/** The project root, found from this file in the sources and in the server build alike. */
function projectRoot() {
  let dir = path.dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 8; i++) {
    if (fs.existsSync(path.join(dir, "package.json")) && fs.existsSync(path.join(dir, "app"))) return dir;
    dir = path.dirname(dir);
  }
  return process.cwd();
}

declare global {
  var __pacewrightActivityPool: Piscina | undefined;
  var __pacewrightParsesByUser: Map<number, number> | undefined;
}

function pool() {
  globalThis.__pacewrightActivityPool ??= new Piscina({
    filename: path.join(projectRoot(), "app/.server/workers/activity-worker.mjs"),
    minThreads: 0,
    maxThreads: ACTIVITY_LIMITS.threads,
    maxQueue: ACTIVITY_LIMITS.queue,
    concurrentTasksPerWorker: 1,
    // Parsing yields the CPU to the request thread when both want it (Unix thread priority).
    niceIncrement: 10,
    // Idle workers exit, so the memory a big file took is handed back instead of kept by a parked thread.
    idleTimeout: 2_000,
    // A file that balloons in memory kills its worker, not the server.
    resourceLimits: { maxOldGenerationSizeMb: 512 },
  });
  return globalThis.__pacewrightActivityPool;
}

/** Worker threads alive right now (0 once the pool has been idle for a while). */
export function activityThreads() {
  return globalThis.__pacewrightActivityPool?.threads.length ?? 0;
}

/**
 * Reads a ride file on a worker thread. The per-person count lives in this process, as the threads do: it guards
 * this process's CPU, not an account.
 */
export async function readActivityOffThread(
  task: Omit<ActivityTask, "limits">,
  userId: number,
): Promise<Extract<ActivityTaskResult, { ok: true }>> {
  globalThis.__pacewrightParsesByUser ??= new Map();
  const running = globalThis.__pacewrightParsesByUser;
  const mine = running.get(userId) ?? 0;
  if (mine >= ACTIVITY_LIMITS.perUser) {
    throw new DomainError("rate_limited", `You already have ${mine} files being read; wait until they are done.`);
  }
  const p = pool();
  if (p.queueSize >= ACTIVITY_LIMITS.queue) {
    throw new DomainError("busy", "The server is reading many files right now; try again in a minute.");
  }
  running.set(userId, mine + 1);
  try {
    const result = (await p.run(
      {
        ...task,
        limits: { maxRows: ACTIVITY_LIMITS.maxRows, maxDurationS: ACTIVITY_LIMITS.maxDurationS },
      } satisfies ActivityTask,
      {
        signal: AbortSignal.timeout(ACTIVITY_LIMITS.parseMs),
      },
    )) as ActivityTaskResult;
    if (!result.ok) throw new DomainError(result.kind, result.message);
    return result;
  } catch (err) {
    if (err instanceof DomainError) throw err;
    const e = err as { name?: string; code?: string; message?: string };
    if (e?.name === "AbortError" || e?.name === "TimeoutError") {
      throw new DomainError(
        "unreadable",
        `Reading this file took longer than ${ACTIVITY_LIMITS.parseMs / 1000} s, so it was stopped. Export one ride at a time.`,
      );
    }
    if (e?.code === "ERR_WORKER_OUT_OF_MEMORY")
      throw new DomainError("too_large", "This file needs too much memory to read. Export one ride at a time.");
    if (/queue is at limit/i.test(e?.message ?? ""))
      throw new DomainError("busy", "The server is reading many files right now; try again in a minute.");
    throw err;
  } finally {
    const left = (running.get(userId) ?? 1) - 1;
    if (left > 0) running.set(userId, left);
    else running.delete(userId);
  }
}

/** Stops the worker threads (server shutdown, end of a test file). */
export async function closeActivityPool() {
  const p = globalThis.__pacewrightActivityPool;
  globalThis.__pacewrightActivityPool = undefined;
  if (p) await p.close({ force: true });
}
