import { describe, expect, it } from "vitest";
import {
  estimateSession,
  expandBlocks,
  seasonSkeleton,
  validateBlocks,
  TrainingInputError,
  type Block,
} from "~/lib/training";

const threshold4x8: Block[] = [
  { kind: "warmup", durationS: 900, target: { metric: "power", lowPct: 50, highPct: 70 } },
  {
    kind: "repeats",
    count: 4,
    work: { durationS: 480, target: { metric: "power", lowPct: 95, highPct: 99 } },
    recovery: { durationS: 240, target: { metric: "power", lowPct: 50 } },
  },
  { kind: "ramp", durationS: 300, metric: "power", fromPct: 60, toPct: 40 },
  { kind: "open", durationS: 300 },
];

describe("blocks", () => {
  it("repeats unroll into work and recovery steps in order", () => {
    const steps = expandBlocks(threshold4x8);
    expect(steps).toHaveLength(1 + 8 + 1 + 1);
    expect(steps[1]).toMatchObject({ part: "work", rep: 1, startS: 900, durationS: 480, lowPct: 95, highPct: 99 });
    expect(steps[2]).toMatchObject({ part: "recovery", rep: 1, startS: 1380 });
    expect(steps.at(-1)!.startS).toBe(900 + 4 * 720 + 300);
  });
  it("validation keys each problem to its field", () => {
    const errors = validateBlocks([
      { kind: "steady", durationS: 0, target: { metric: "power", lowPct: 350 } },
      {
        kind: "repeats",
        count: 51,
        work: { durationS: 60, target: { metric: "power", lowPct: 110, highPct: 100 } },
        recovery: { durationS: 60 },
      },
      { kind: "open", durationS: 13 * 3600 },
    ]);
    expect(Object.keys(errors).sort()).toEqual(
      [
        "blocks.0.durationS",
        "blocks.0.target.lowPct",
        "blocks.1.count",
        "blocks.1.work.target.highPct",
        "blocks.2.durationS",
      ].sort(),
    );
    expect(validateBlocks([])).toHaveProperty("blocks");
    expect(validateBlocks(threshold4x8)).toEqual({});
  });
});

describe("estimateSession", () => {
  const est = estimateSession(threshold4x8, { power: 250 });
  it("minutes per band plus untargeted minutes add up to the duration", () => {
    const total = est.minutesPerBand.reduce((s, m) => s + m, 0) + est.openMinutes;
    expect(est.durationS).toBe(900 + 4 * 720 + 600);
    expect(total * 60).toBeCloseTo(est.durationS, 6);
  });
  it("puts the warm-up at its midpoint (60 %, the default Steady band), the repeats at 97 % (Ridge)", () => {
    expect(est.minutesPerBand[3]).toBeCloseTo(32, 9);
    expect(est.minutesPerBand[1]).toBeGreaterThanOrEqual(15);
    expect(est.openMinutes).toBeCloseTo(5, 9);
  });
  it("work counts only power-targeted steps: Σ pct × threshold × seconds", () => {
    const expected = (0.6 * 250 * 900 + 4 * (0.97 * 250 * 480 + 0.5 * 250 * 240) + 0.5 * 250 * 300) / 1000;
    expect(est.workKj).toBeCloseTo(expected, 6);
    expect(estimateSession(threshold4x8).workKj).toBeNull();
  });
  it("refuses invalid blocks", () => {
    expect(() => estimateSession([{ kind: "steady", durationS: -5, target: { metric: "power", lowPct: 80 } }])).toThrow(
      TrainingInputError,
    );
  });
});

describe("season skeleton (constants are common practice)", () => {
  const plan = seasonSkeleton({
    eventDate: "2027-04-18",
    weeks: 16,
    weeklyHours: 10,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  const w = plan.weeks;
  it("16 weeks ending in the event week, starting on a Monday", () => {
    expect(w).toHaveLength(16);
    // 18 April 2027 is a Sunday: its week starts Monday 12 April, and 15 weeks earlier is Monday 28 December.
    expect(plan.startDate).toBe("2026-12-28");
    expect(new Date(`${plan.startDate}T00:00:00Z`).getUTCDay()).toBe(1);
    expect(w.at(-1)!.phase).toBe("race");
    expect(w.at(-1)!.startDate).toBe("2027-04-12");
    expect(plan.eventDate).toBe("2027-04-18");
  });
  it("recovery every 4th week under 3:1, a two-week taper, tests right after a recovery week", () => {
    expect(w.filter((x) => x.recovery).map((x) => x.index)).toEqual([4, 8, 12]);
    expect(w.filter((x) => x.phase === "taper").map((x) => x.index)).toEqual([14, 15]);
    // Weeks 7 and 13 were the old defaults: 7 is the heaviest week before recovery week 8, 13 the only loading
    // week of its block. Rest, then test: week 9 follows recovery week 8 (8 weeks after week 1).
    expect(w.filter((x) => x.test).map((x) => x.index)).toEqual([1, 9]);
    // Phases start on loading weeks: build on 9 (not recovery week 8), peak on 13 (not recovery week 12).
    expect(w.filter((x) => x.phase === "build").map((x) => x.index)).toEqual([9, 10, 11, 12]);
    expect(w.filter((x) => x.phase === "peak").map((x) => x.index)).toEqual([13]);
    expect(w[0].phase).toBe("base");
    expect(w.some((x) => x.phase === "build")).toBe(true);
  });
  it("load never rises more than 10 % over the previous non-recovery week, and tapers down", () => {
    let last = 0;
    for (const week of w) {
      if (week.recovery || week.phase === "taper" || week.phase === "race") continue;
      if (last) expect(week.loadFactor).toBeLessThanOrEqual(last * 1.1 + 1e-9);
      last = week.loadFactor;
    }
    expect(w[13].loadFactor).toBeLessThan(w[12].loadFactor);
    expect(w[14].loadFactor).toBeLessThan(w[13].loadFactor);
    expect(w[3].loadFactor).toBeLessThan(w[2].loadFactor);
    expect(w[0].hours).toBe(9);
  });
  it("2:1 puts recovery every 3rd week, but not right before the taper; two dates give the week count", () => {
    const p = seasonSkeleton({ startDate: "2027-01-06", eventDate: "2027-03-28", weeklyHours: 8, pattern: "2:1" });
    expect(p.weeks).toHaveLength(12);
    expect(p.weeks.filter((x) => x.phase === "taper").map((x) => x.index)).toEqual([10, 11]);
    expect(p.weeks.filter((x) => x.recovery).map((x) => x.index)).toEqual([3, 6]);
  });
  it("for any plan: phases begin on loading weeks, tests follow recovery weeks 4–8 weeks apart, never on a block's heaviest week (common practice)", () => {
    for (const pattern of ["3:1", "2:1"] as const) {
      for (let weeks = 4; weeks <= 40; weeks++) {
        for (const testEveryWeeks of [4, 5, 6, 7, 8]) {
          for (const withEvent of [true, false]) {
            const p = seasonSkeleton({
              ...(withEvent ? { eventDate: "2027-09-12" } : { startDate: "2027-01-04" }),
              weeks,
              weeklyHours: 8,
              pattern,
              testEveryWeeks,
            });
            const label = `${pattern} ${weeks} weeks, test every ${testEveryWeeks}, ${withEvent ? "event" : "no event"}`;
            const ws = p.weeks;
            for (let i = 1; i < ws.length; i++) {
              if (ws[i].phase !== ws[i - 1].phase && ["base", "build", "peak"].includes(ws[i].phase))
                expect(ws[i].recovery, `${label}: week ${i + 1} starts ${ws[i].phase}`).toBe(false);
            }
            const tests = ws.filter((x) => x.test).map((x) => x.index);
            expect(tests[0], label).toBe(1);
            for (let k = 1; k < tests.length; k++) {
              const t = tests[k];
              expect(ws[t - 2].recovery, `${label}: test week ${t} follows a recovery week`).toBe(true);
              expect(t - tests[k - 1], label).toBeGreaterThanOrEqual(4);
              expect(t - tests[k - 1], label).toBeLessThanOrEqual(8);
              expect(["taper", "race"], label).not.toContain(ws[t - 1].phase);
              // The block runs from the test week to the next recovery week (or the end of the loading weeks).
              const block = [];
              for (
                let i = t;
                i <= ws.length && !ws[i - 1].recovery && ["base", "build", "peak"].includes(ws[i - 1].phase);
                i++
              )
                block.push(ws[i - 1]);
              expect(
                Math.max(...block.map((b) => b.loadFactor)),
                `${label}: week ${t} is not the block's heaviest`,
              ).toBeGreaterThan(ws[t - 1].loadFactor);
            }
          }
        }
      }
    }
  });
  it("refuses impossible inputs", () => {
    expect(() => seasonSkeleton({ eventDate: "2027-02-30", weeks: 10, weeklyHours: 8, pattern: "3:1" })).toThrow(
      /real date/,
    );
    expect(() =>
      seasonSkeleton({ startDate: "2027-05-01", eventDate: "2027-03-01", weeklyHours: 8, pattern: "3:1" }),
    ).toThrow(/after the start/);
    expect(() => seasonSkeleton({ startDate: "2027-01-04", weeks: 2, weeklyHours: 8, pattern: "3:1" })).toThrow(
      /4 to 104/,
    );
    expect(() => seasonSkeleton({ startDate: "2027-01-04", weeks: 10, weeklyHours: 0, pattern: "3:1" })).toThrow(
      TrainingInputError,
    );
    expect(() =>
      seasonSkeleton({ startDate: "2027-01-04", weeks: 10, weeklyHours: 8, pattern: "3:1", testEveryWeeks: 3 }),
    ).toThrow(/4 to 8 weeks/);
  });
});
