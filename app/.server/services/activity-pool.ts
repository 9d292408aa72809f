import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Piscina } from "piscina";
import type { ActivityLimits, ActivityTask, ActivityTaskResult } from "../workers/activity-task";

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

export class ActivityReadError extends Error {
  name = "ActivityReadError";
  constructor(
    message: string,
    readonly status: number,
  ) {
    super(message);
  }
}

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
export async function readActivityOffThread(task: Omit<ActivityTask, "limits">, userId: number): Promise<Extract<ActivityTaskResult, { ok: true }>> {
  globalThis.__pacewrightParsesByUser ??= new Map();
  const running = globalThis.__pacewrightParsesByUser;
  const mine = running.get(userId) ?? 0;
  if (mine >= ACTIVITY_LIMITS.perUser) {
    throw new ActivityReadError(`You already have ${mine} files being read; wait until they are done.`, 429);
  }
  const p = pool();
  if (p.queueSize >= ACTIVITY_LIMITS.queue) {
    throw new ActivityReadError("The server is reading many files right now; try again in a minute.", 503);
  }
  running.set(userId, mine + 1);
  try {
    const result = (await p.run({ ...task, limits: { maxRows: ACTIVITY_LIMITS.maxRows, maxDurationS: ACTIVITY_LIMITS.maxDurationS } } satisfies ActivityTask, {
      signal: AbortSignal.timeout(ACTIVITY_LIMITS.parseMs),
    })) as ActivityTaskResult;
    if (!result.ok) throw new ActivityReadError(result.message, result.status);
    return result;
  } catch (err) {
    if (err instanceof ActivityReadError) throw err;
    const e = err as { name?: string; code?: string; message?: string };
    if (e?.name === "AbortError" || e?.name === "TimeoutError") {
      throw new ActivityReadError(`Reading this file took longer than ${ACTIVITY_LIMITS.parseMs / 1000} s, so it was stopped. Export one ride at a time.`, 422);
    }
    if (e?.code === "ERR_WORKER_OUT_OF_MEMORY") throw new ActivityReadError("This file needs too much memory to read. Export one ride at a time.", 413);
    if (/queue is at limit/i.test(e?.message ?? "")) throw new ActivityReadError("The server is reading many files right now; try again in a minute.", 503);
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
