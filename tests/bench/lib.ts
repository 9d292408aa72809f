import { performance } from "node:perf_hooks";

export interface BenchFigure {
  name: string;
  subjectMs: number;
  baselineMs: number;
  baseline: string;
  /** subject ÷ baseline for times; for throughput figures (`higherIsBetter`) subject ÷ baseline of requests/s. */
  ratio: number;
  /** The aim for the ratio: at most this for times, at least this for throughput. */
  aim?: number;
  higherIsBetter?: boolean;
  /** One plain sentence: what was measured, what the baseline does, and anything that skews the figure. */
  note?: string;
}

/** Whether a figure meets its aim ("—" when it has none). */
export function verdict(f: BenchFigure): "meets aim" | "misses aim" | "—" {
  if (f.aim === undefined) return "—";
  const ok = f.higherIsBetter ? f.ratio >= f.aim : f.ratio <= f.aim;
  return ok ? "meets aim" : "misses aim";
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
};

/**
 * Measures subject and baseline alternately, one run of each in turn (after warm-up runs of both), so a burst of
 * machine load or a GC pause hits both alike; reports the medians and their ratio.
 */
export async function compare(
  name: string,
  subject: () => unknown,
  baseline: () => unknown,
  opts: { baselineName: string; runs?: number; warmup?: number; aim?: number; note?: string },
): Promise<BenchFigure> {
  const runs = opts.runs ?? 15;
  const warmup = opts.warmup ?? 3;
  for (let i = 0; i < warmup; i++) {
    await subject();
    await baseline();
  }
  const s: number[] = [];
  const b: number[] = [];
  for (let i = 0; i < runs; i++) {
    // Alternate which goes first too, so neither always runs on a warmer cache.
    const order = i % 2 === 0 ? ([subject, s, baseline, b] as const) : ([baseline, b, subject, s] as const);
    let t0 = performance.now();
    await order[0]();
    order[1].push(performance.now() - t0);
    t0 = performance.now();
    await order[2]();
    order[3].push(performance.now() - t0);
  }
  return figure(name, median(s), median(b), opts);
}

/**
 * Like `compare`, for subjects that change state on every run (each run needs its own fresh input): `prepare(i)`
 * runs untimed before the i-th subject and baseline run and returns both, measured alternately.
 */
export async function compareEach<T>(
  name: string,
  prepare: (i: number) => Promise<{ subject: () => Promise<T> | T; baseline: () => unknown }>,
  opts: { baselineName: string; runs?: number; aim?: number; note?: string },
): Promise<BenchFigure> {
  const runs = opts.runs ?? 5;
  const s: number[] = [];
  const b: number[] = [];
  for (let i = 0; i < runs; i++) {
    const { subject, baseline } = await prepare(i);
    const first = i % 2 === 0;
    for (const which of first ? ["s", "b"] : ["b", "s"]) {
      const t0 = performance.now();
      if (which === "s") await subject();
      else await baseline();
      (which === "s" ? s : b).push(performance.now() - t0);
    }
  }
  return figure(name, median(s), median(b), opts);
}

function figure(
  name: string,
  subjectMs: number,
  baselineMs: number,
  opts: { baselineName: string; aim?: number; note?: string },
): BenchFigure {
  return {
    name,
    subjectMs: round(subjectMs),
    baselineMs: round(baselineMs),
    baseline: opts.baselineName,
    ratio: round(subjectMs / Math.max(baselineMs, 1e-6)),
    aim: opts.aim,
    note: opts.note,
  };
}

export const round = (x: number) => Math.round(x * 1000) / 1000;
