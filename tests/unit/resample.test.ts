import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { parseActivity, SHORT_GAP_S } from "~/lib/training";

/**
 * A plain object-per-point resampler written from the gap rule as documented on SHORT_GAP_S (out-of-order readings
 * sorted, readings in one second averaged, ≤ 5 s gaps interpolated, longer gaps power/cadence 0 and others missing).
 * The library's column-wise version must give the same samples and counts on arbitrary files.
 */
function reference(rows: { t: number; power?: number; hr?: number }[]) {
  const pts = rows
    .filter((r) => r.t >= 0)
    .map((r) => ({
      t: r.t,
      power: r.power !== undefined && r.power <= 3000 ? r.power : undefined,
      hr: r.hr !== undefined && r.hr >= 25 && r.hr <= 250 ? r.hr : undefined,
    }));
  pts.sort((a, b) => a.t - b.t);
  const channels = (["power", "hr"] as const).filter((c) => pts.some((p) => p[c] !== undefined));
  const t0 = pts[0].t;
  const n = Math.floor(pts[pts.length - 1].t - t0) + 1;
  const out: Record<string, number | null>[] = Array.from({ length: n }, (_, t) =>
    Object.fromEntries([["t", t], ...channels.map((c) => [c, null])]),
  );
  let interpolatedS = 0;
  let stoppedS = 0;
  for (const c of channels) {
    const known = new Map<number, number[]>();
    for (const p of pts) {
      const v = p[c];
      if (v === undefined) continue;
      const i = Math.min(n - 1, Math.round(p.t - t0));
      known.set(i, [...(known.get(i) ?? []), v]);
    }
    const seconds = [...known.keys()].sort((a, b) => a - b);
    seconds.forEach((i, j) => {
      const vs = known.get(i)!;
      out[i][c] = vs.reduce((s, v) => s + v, 0) / vs.length;
      if (j === 0) return;
      const prev = seconds[j - 1];
      const gap = i - prev - 1;
      if (gap < 1) return;
      for (let k = prev + 1; k < i; k++) {
        if (gap <= SHORT_GAP_S)
          out[k][c] =
            (out[prev][c] as number) + (((out[i][c] as number) - (out[prev][c] as number)) * (k - prev)) / (i - prev);
        else if (c === "power") out[k][c] = 0;
      }
      if (c === channels[0]) {
        if (gap <= SHORT_GAP_S) interpolatedS += gap;
        else stoppedS += gap;
      }
    });
  }
  return { out, interpolatedS, stoppedS };
}

describe("resampling to 1 Hz", () => {
  it("matches an object-per-point reference on shuffled, duplicated, gappy and implausible readings", () => {
    const row = fc.record({
      t: fc.integer({ min: -3, max: 400 }).map((t) => t / 2),
      power: fc.option(fc.integer({ min: 0, max: 3200 }), { nil: undefined }),
      hr: fc.option(fc.integer({ min: 10, max: 260 }), { nil: undefined }),
    });
    fc.assert(
      fc.property(fc.array(row, { minLength: 1, maxLength: 120 }), (rows) => {
        const usable = rows.filter(
          (r) =>
            r.t >= 0 &&
            ((r.power !== undefined && r.power <= 3000) || (r.hr !== undefined && r.hr >= 25 && r.hr <= 250)),
        );
        fc.pre(usable.length > 0);
        const csv = ["time,power,hr", ...rows.map((r) => `${r.t},${r.power ?? ""},${r.hr ?? ""}`)].join("\n");
        const got = parseActivity(csv, "x.csv");
        const want = reference(rows);
        expect(got.samples).toEqual(want.out);
        expect(got.meta.interpolatedS).toBe(want.interpolatedS);
        expect(got.meta.stoppedS).toBe(want.stoppedS);
      }),
      { numRuns: 300 },
    );
  });
});
