/**
 * The shapes every activity reader shares: the 1 Hz sample a parsed file becomes, the column-wise raw readings a
 * reader fills before resampling, and the per-reading number and time-stamp helpers the readers call in their loops.
 */
/** One second of an activity after resampling. Channels the file lacks are absent; a missing reading is null. */
export interface Sample {
  t: number;
  power?: number | null;
  hr?: number | null;
  cadence?: number | null;
  /** m/s */
  speed?: number | null;
  /** metres from the start */
  distance?: number | null;
}

export type Channel = "power" | "hr" | "cadence" | "speed" | "distance";
export const CHANNELS: readonly Channel[] = ["power", "hr", "cadence", "speed", "distance"];

export interface Activity {
  samples: Sample[];
  meta: {
    format: "csv" | "gpx" | "fit";
    startTime: string | null;
    durationS: number;
    channels: Channel[];
    sourcePoints: number;
    /** Seconds filled by interpolation across short gaps. */
    interpolatedS: number;
    /** Seconds inside long gaps (treated as stopped: power 0, other channels missing). */
    stoppedS: number;
    /**
     * Laps the file marks, as [startS, endS) of the 1 Hz series: FIT lap messages, a CSV "lap" column, or GPX track
     * segments. Only when the file marks two or more; otherwise absent.
     */
    laps?: { startS: number; endS: number }[];
  };
}

/**
 * Raw readings (not yet at 1 Hz), column-wise: `t` is the elapsed time in seconds, and NaN marks a missing or
 * unreadable reading. A channel the file lacks may be left empty. Columns rather than an object per reading: a
 * 4-hour file has tens of thousands of readings, and those objects were a large share of parsing time and garbage.
 */
export interface RawSeries {
  t: number[];
  power: number[];
  hr: number[];
  cadence: number[];
  speed: number[];
  distance: number[];
}

export const rawSeries = (): RawSeries => ({ t: [], power: [], hr: [], cadence: [], speed: [], distance: [] });

/** A lap in the file's own seconds (the same clock as its points' `t`). */
export type RawLap = { startT: number; endT: number };

/** What each format's reader hands to the resampler. */
export type RawRead = { points: RawSeries; startTime: string | null; laps: RawLap[] };

export const num = (v: unknown): number | undefined => {
  if (v === null || v === undefined || v === "") return undefined;
  const n = typeof v === "number" ? v : Number(String(v).trim().replace(",", "."));
  return Number.isFinite(n) ? n : undefined;
};

/**
 * `num` for one reading, NaN when missing. A plain number string is read directly: Number() already ignores the
 * same surrounding white space as trim(), and a decimal comma never gives a finite number, so only strings that
 * fail go through `num`'s trim and comma replacement (a new string each) and come out the same.
 */
export function reading(v: unknown): number {
  if (typeof v === "number") return Number.isFinite(v) ? v : NaN;
  if (typeof v === "string" && v !== "") {
    const n = +v;
    if (Number.isFinite(n)) return n;
  }
  return num(v) ?? NaN;
}

/** The decimal number in text[from, from + count), or -1 when a character is not a digit. */
function digitsAt(text: string, from: number, count: number): number {
  let v = 0;
  for (let i = from; i < from + count; i++) {
    const x = text.charCodeAt(i) - 48;
    if (x < 0 || x > 9) return -1;
    v = v * 10 + x;
  }
  return v;
}

/**
 * Date.parse for a time stamp, with the layouts writers use read by hand ("2026-11-14T08:00:00Z", with or without
 * milliseconds): Date.parse on every reading of a long file was a large part of reading it. Any other text goes to
 * Date.parse, so the result is the same (tests/unit/iso-time.test.ts checks it against Date.parse).
 */
export function timeMs(text: string): number {
  const n = text.length;
  if (
    (n === 20 || n === 24) &&
    text.charCodeAt(n - 1) === 90 /* Z */ &&
    text.charCodeAt(4) === 45 &&
    text.charCodeAt(7) === 45 &&
    text.charCodeAt(10) === 84 &&
    text.charCodeAt(13) === 58 &&
    text.charCodeAt(16) === 58 &&
    (n === 20 || text.charCodeAt(19) === 46)
  ) {
    // Module-level helpers, no closures: this runs once per reading.
    const year = digitsAt(text, 0, 4);
    const month = digitsAt(text, 5, 2);
    const day = digitsAt(text, 8, 2);
    const hour = digitsAt(text, 11, 2);
    const minute = digitsAt(text, 14, 2);
    const second = digitsAt(text, 17, 2);
    const milli = n === 24 ? digitsAt(text, 20, 3) : 0;
    // Hour 24 and out-of-range fields are Date.parse's to judge; V8 rolls a day past the month's end over, as Date.UTC does.
    // Date.UTC takes years 0 to 99 as 1900 to 1999, so those are left to Date.parse too.
    if (year >= 100 && milli >= 0 && month >= 1 && month <= 12 && day >= 1 && day <= 31 && hour >= 0 && hour < 24)
      if (minute >= 0 && minute < 60 && second >= 0 && second < 60)
        return Date.UTC(year, month - 1, day, hour, minute, second, milli);
  }
  return Date.parse(text);
}
