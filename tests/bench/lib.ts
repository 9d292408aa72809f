import { performance } from "node:perf_hooks";

export interface BenchFigure {
  name: string;
  subjectMs: number;
  baselineMs: number;
  baseline: string;
  ratio: number;
  aim?: number;
  note?: string;
}

/** Median wall time of `fn` over `runs` runs after `warmup` runs; medians resist the odd GC pause. */
export async function median(fn: () => unknown, { runs = 15, warmup = 3 } = {}): Promise<number> {
  for (let i = 0; i < warmup; i++) await fn();
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    await fn();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(times.length / 2)];
}

/** Measures subject and baseline alternately in the same run, so machine load affects both alike. */
export async function compare(
  name: string,
  subject: () => unknown,
  baseline: () => unknown,
  opts: { baselineName: string; runs?: number; aim?: number; note?: string },
): Promise<BenchFigure> {
  const subjectMs = await median(subject, { runs: opts.runs });
  const baselineMs = await median(baseline, { runs: opts.runs });
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

const round = (x: number) => Math.round(x * 1000) / 1000;
