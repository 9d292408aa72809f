import { requireFinite, TrainingInputError } from "./errors";
import { addWeeks, daysBetween, isIsoDate, mondayOf } from "~/lib/dates";

export const PHASES = ["base", "build", "peak", "taper", "race", "recovery"] as const;
export type Phase = (typeof PHASES)[number];

export interface SkeletonWeek {
  index: number;
  /** Monday of the week, YYYY-MM-DD. */
  startDate: string;
  phase: Phase;
  recovery: boolean;
  test: boolean;
  loadFactor: number;
  hours: number;
}

export interface SkeletonInput {
  startDate?: string;
  eventDate?: string;
  weeks?: number;
  /** Hours of a week whose load factor is 1.0. */
  weeklyHours: number;
  pattern: "3:1" | "2:1";
  testEveryWeeks?: number;
  /** Largest rise of load from one loading week to the next (default 10 %, common practice). */
  maxWeeklyRise?: number;
}

function parseDay(s: string, label: string): string {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(s))
    throw new TrainingInputError("out_of_range", `${label} must be a date like 2027-04-18.`);
  if (!isIsoDate(s)) throw new TrainingInputError("out_of_range", `${label} is not a real date.`);
  return s;
}

/** Load pattern constants (common practice): the first loading week, the step between loading weeks and blocks. */
const FIRST_WEEK = 0.9;
const WEEK_STEP = 0.05;
const RECOVERY_FACTOR = 0.6;
const TAPER = { one: [0.6], two: [0.75, 0.55] } as const;
const RACE_WEEK = 0.45;
/** Retests fall 4 to 8 weeks apart (the trade's usual retest interval, common practice). */
export const TEST_GAP = { min: 4, max: 8 } as const;

/**
 * A season skeleton: weeks from Monday to Monday with phase, recovery weeks every 4th (3:1) or 3rd (2:1) week,
 * phases that begin on a block's first loading week, test weeks at the first week and then right after recovery
 * weeks, 4–8 weeks apart and as near every N weeks as the blocks allow, load factors that rise gently within each loading block and
 * step up from block to block, never more than `maxWeeklyRise` over the previous non-recovery week, and a taper
 * (two weeks from 12 weeks on, else one) before an event week. Constants are common practice, not one source.
 */
export function seasonSkeleton(input: SkeletonInput): {
  startDate: string;
  eventDate: string | null;
  weeks: SkeletonWeek[];
} {
  const hours = requireFinite(input.weeklyHours, "Weekly hours", { min: 0, exclusiveMin: true, max: 40 });
  const cap = requireFinite(input.maxWeeklyRise ?? 0.1, "Largest weekly rise", {
    min: 0,
    exclusiveMin: true,
    max: 0.5,
  });
  const testEvery = input.testEveryWeeks ?? 6;
  if (!Number.isInteger(testEvery) || testEvery < TEST_GAP.min || testEvery > TEST_GAP.max) {
    throw new TrainingInputError("out_of_range", `Test every ${TEST_GAP.min} to ${TEST_GAP.max} weeks.`);
  }
  if (input.pattern !== "3:1" && input.pattern !== "2:1")
    throw new TrainingInputError("out_of_range", "Choose the 3:1 or 2:1 loading pattern.");
  const cycle = input.pattern === "3:1" ? 4 : 3;

  let start: string;
  let count: number;
  const event = input.eventDate ? parseDay(input.eventDate, "The event date") : null;
  if (input.startDate && event !== null) {
    start = mondayOf(parseDay(input.startDate, "The start date"));
    if (event < start) throw new TrainingInputError("inconsistent", "The event must come after the start.");
    count = daysBetween(start, mondayOf(event)) / 7 + 1;
  } else if (input.weeks !== undefined) {
    count = input.weeks;
    if (!Number.isInteger(count)) throw new TrainingInputError("out_of_range", "Weeks must be a whole number.");
    start =
      event !== null
        ? addWeeks(mondayOf(event), -(count - 1))
        : mondayOf(parseDay(input.startDate ?? "", "The start date"));
  } else {
    throw new TrainingInputError(
      "out_of_range",
      "Give a start date, an event date and a number of weeks, or both dates.",
    );
  }
  if (count < 4 || count > 104) throw new TrainingInputError("out_of_range", "A season plan runs 4 to 104 weeks.");

  const hasEvent = event !== null;
  const taperWeeks = hasEvent ? (count >= 12 ? 2 : 1) : 0;
  const raceWeeks = hasEvent ? 1 : 0;
  const pre = count - taperWeeks - raceWeeks;
  const peakWeeks = hasEvent ? Math.min(2, Math.floor(pre / 6)) : 0;
  // Phases begin on the first (loading) week of a block, never on a recovery week: each rough boundary moves to
  // the nearest block start (ties: the later one).
  const blockStarts: number[] = [];
  for (let i = 1 + cycle; i <= pre; i += cycle) blockStarts.push(i);
  const snap = (week: number, after: number) => {
    const options = blockStarts.filter((b) => b > after);
    if (!options.length) return null;
    return options.reduce((best, b) => (Math.abs(b - week) <= Math.abs(best - week) ? b : best));
  };
  const buildStart = snap(Math.ceil((pre - peakWeeks) * 0.6) + 1, 1);
  const peakStart = peakWeeks > 0 ? snap(pre - peakWeeks + 1, buildStart ?? 1) : null;
  const baseWeeks = (buildStart ?? peakStart ?? pre + 1) - 1;
  const buildEnd = (peakStart ?? pre + 1) - 1;

  const weeks: SkeletonWeek[] = [];
  let blockStart = FIRST_WEEK;
  let inBlock = 0;
  let lastLoading = 0;
  for (let i = 1; i <= count; i++) {
    let phase: Phase;
    if (i <= baseWeeks) phase = "base";
    else if (i <= buildEnd) phase = "build";
    else if (i <= pre) phase = "peak";
    else if (i <= pre + taperWeeks) phase = "taper";
    else phase = "race";

    // No recovery week right before the taper: the taper itself unloads.
    const recovery = i < pre && i % cycle === 0;
    let factor: number;
    if (phase === "taper") {
      factor = lastLoading * (taperWeeks === 2 ? TAPER.two : TAPER.one)[i - pre - 1];
    } else if (phase === "race") {
      factor = lastLoading * RACE_WEEK;
    } else if (recovery) {
      factor = lastLoading * RECOVERY_FACTOR;
      blockStart += WEEK_STEP; // each block starts one step above the last
      inBlock = 0;
    } else {
      factor = blockStart + inBlock * WEEK_STEP;
      inBlock++;
    }
    if (!recovery && phase !== "taper" && phase !== "race" && lastLoading > 0)
      factor = Math.min(factor, lastLoading * (1 + cap));
    if (!recovery && phase !== "taper" && phase !== "race") lastLoading = factor;
    weeks.push({
      index: i,
      startDate: addWeeks(start, i - 1),
      phase,
      recovery,
      test: false,
      loadFactor: Math.round(factor * 1000) / 1000,
      hours: Math.round(hours * factor * 4) / 4,
    });
  }
  // Rest, then test: the first week, then weeks right after a recovery week (the lightest week of a block, never
  // its heaviest: a block of one loading week gets no test), each 4–8 weeks after the last test and as close to `testEvery` as the blocks allow; none in
  // the taper or race week.
  const blockOf = (c: number) => {
    const block: SkeletonWeek[] = [];
    for (let i = c; i <= pre && !weeks[i - 1].recovery; i++) block.push(weeks[i - 1]);
    return block;
  };
  const afterRecovery = weeks
    .filter((w) => w.index > 1 && w.index <= pre && weeks[w.index - 2].recovery)
    .filter((w) => blockOf(w.index).some((x) => x.loadFactor > w.loadFactor))
    .map((w) => w.index);
  let last = 1;
  weeks[0].test = true;
  // Aim at 1 + k × testEvery, so the average spacing is testEvery even where blocks force 4- or 8-week gaps.
  for (let k = 1; ; k++) {
    const target = 1 + k * testEvery;
    const options = afterRecovery.filter((c) => c - last >= TEST_GAP.min && c - last <= TEST_GAP.max);
    if (!options.length) break;
    const next = options.reduce((best, c) => (Math.abs(c - target) <= Math.abs(best - target) ? c : best));
    weeks[next - 1].test = true;
    last = next;
  }
  return { startDate: start, eventDate: event, weeks };
}
