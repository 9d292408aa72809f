import type { BoardItem, BoardShape, BoardWeek } from "~/lib/board";

/** Rise of planned load over the previous non-recovery week above which a week is flagged (common practice). */
export const RISE_CAP = 0.1;

export interface WeekStats {
  week: BoardWeek;
  load: number;
  seconds: number;
  /** Minutes per band, in the order of the viewer's power bands. */
  levels: number[];
  rise: number;
  warn: boolean;
}

/** Each week's planned time, load and minutes per band, and its rise over the last loading week. */
export function weekStats(weeks: BoardWeek[], items: BoardItem[], shapes: BoardShape[], bands: number): WeekStats[] {
  const stats = weeks.map((w) => {
    const mine = items.filter((i) => i.weekId === w.id);
    const levels = new Array(bands).fill(0);
    let load = 0;
    let seconds = 0;
    for (const i of mine) {
      const e = shapes[i.shape];
      seconds += i.durationS;
      if (e) {
        load += e.load;
        e.levels.forEach((m, k) => (levels[k] += m));
      }
    }
    return { week: w, load, seconds, levels };
  });
  // The rise is measured from the last loaded week that was not a recovery week.
  const out: WeekStats[] = [];
  let prev: number | null = null;
  for (const s of stats) {
    const rise = prev && prev > 0 && !s.week.recovery ? (s.load - prev) / prev : 0;
    if (!s.week.recovery && s.load > 0) prev = s.load;
    out.push({ ...s, rise, warn: rise > RISE_CAP });
  }
  return out;
}
