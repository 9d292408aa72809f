/**
 * Band sets, whole: their keys and defaults, placing a value in a band, shading, per-band tallies, and checking an
 * edited set. Over 300 lines because every part reads the same Band/BandSet shape and limits; split, each piece would
 * import the rest and none would stand alone.
 */
import { requirePositive, TrainingInputError } from "./errors";

export type Metric = "power" | "heart_rate" | "pace";
/** Sports that carry thresholds (a run-pace set and a swim-pace set differ, so bands belong to sport and metric). */
export type BandSport = "bike" | "run" | "swim";
export type BandSetKey = "bike:power" | "bike:heart_rate" | "run:heart_rate" | "run:pace" | "swim:pace";
export const BAND_SET_KEYS: readonly BandSetKey[] = [
  "bike:power",
  "bike:heart_rate",
  "run:heart_rate",
  "run:pace",
  "swim:pace",
];

/**
 * One intensity band. Boundaries are in % of threshold (for pace: % of threshold *speed*, so faster = higher).
 *
 * THE CONVENTION (one for every metric): a band is the half-open interval [fromPct, toPct). The lower boundary
 * belongs to the band, the upper boundary belongs to the band above. The first band starts at 0 %, the last band is
 * open-ended (toPct null), so every intensity above 0 falls in exactly one band. Example with the default power set:
 * 80 % is "Heavy", 79.9 % is "Steady". Boundaries are whole percentages, which keeps the sets easy to read and edit.
 */
export interface Band {
  name: string;
  fromPct: number;
  toPct: number | null;
  /** One line in plain words: what the band is for and how it feels. */
  meaning: string;
}

export interface BandSet {
  key: BandSetKey;
  sport: BandSport;
  metric: Metric;
  bands: Band[];
  /** True while the set is Pacewright's default (no coach edit saved). */
  isDefault: boolean;
}

export const MIN_BANDS = 3;
export const MAX_BANDS = 8;
export const MAX_BOUNDARY_PCT = 250;

/*
 * Default band sets, Pacewright's own. They follow the intensity-domain model — moderate, heavy, severe and extreme
 * domains separated by the first lactate/ventilatory threshold, the maximal metabolic steady state (critical power)
 * and the highest intensity at which maximal oxygen uptake is still reached (Gaesser & Poole 1996, Exerc Sport Sci
 * Rev 24:35; Jamnick et al. 2020, Sports Med 50:1729) — and the three-zone view of intensity distribution (below the
 * first threshold / between the thresholds / above the second: Seiler & Kjerland 2006, Scand J Med Sci Sports
 * 16:49). A field-test threshold (the 100 % mark) approximates the heavy–severe boundary.
 *
 * Boundary by boundary (documented on the "About these bands" page too):
 * - power 60 %: recovery spinning vs. aerobic riding inside the moderate domain — common practice.
 * - power 80 %, HR 85 %, pace 82 %: the first threshold (moderate → heavy). It sits at roughly 75–85 % of critical
 *   power in trained riders (Jamnick et al. 2020 review the spread; the single figure is common practice).
 * - power 95 % / 105 %, HR 96 % / 101 %, pace 96 % / 104 %: a ridge of ±~5 % around the threshold, because a field
 *   estimate of the heavy–severe boundary is uncertain by about that much — common practice.
 * - power 130 %, pace 115 %: severe → extreme, where exhaustion comes before maximal oxygen uptake is reached (a
 *   couple of minutes or less); the domain is defined physiologically (Jamnick et al. 2020), the figure is common
 *   practice.
 * - swim pace (% of critical swim speed, Wakayoshi et al. 1992; critical swim speed sits near the heavy–severe
 *   boundary like a field threshold does): 84 % / 92 % / 97 % / 103 % / 110 %. Swimming speed rises far less than
 *   effort does (drag grows steeply with speed), so the swim bands are narrower than the run bands — common practice.
 * - heart rate has no band above severe: heart rate lags seconds-to-minutes behind work and cannot show the extreme
 *   domain (Jamnick et al. 2020 on the delayed heart-rate and oxygen-uptake response).
 */
const MEANING = {
  easy: "Loosening up and recovery: breathing easy, full conversation.",
  steady: "Long aerobic work below the first threshold: you could keep this up for hours.",
  heavy: "Above the first threshold but still steady: breathing deepens, talk comes in phrases.",
  ridge: "Around your threshold, the top of what stays steady: hard, focused, sustainable for tens of minutes.",
  severe: "Above threshold: effort climbs until you must stop; intervals of a few minutes.",
  extreme: "Short, all-out bursts: over before the lungs catch up.",
};

const DEFAULTS: Record<BandSetKey, [name: string, fromPct: number, meaning: string][]> = {
  "bike:power": [
    ["Easy", 0, MEANING.easy],
    ["Steady", 60, MEANING.steady],
    ["Heavy", 80, MEANING.heavy],
    ["Ridge", 95, MEANING.ridge],
    ["Severe", 105, MEANING.severe],
    ["Extreme", 130, MEANING.extreme],
  ],
  "bike:heart_rate": [
    ["Easy", 0, MEANING.easy],
    ["Steady", 85, MEANING.steady],
    ["Heavy", 92, MEANING.heavy],
    ["Ridge", 96, MEANING.ridge],
    ["Severe", 101, "Above threshold heart rate: reached late in hard intervals; heart rate lags the effort."],
  ],
  "run:heart_rate": [
    ["Easy", 0, MEANING.easy],
    ["Steady", 86, MEANING.steady],
    ["Heavy", 92, MEANING.heavy],
    ["Ridge", 96, MEANING.ridge],
    ["Severe", 101, "Above threshold heart rate: reached late in hard intervals; heart rate lags the effort."],
  ],
  "run:pace": [
    ["Easy", 0, MEANING.easy],
    ["Steady", 82, MEANING.steady],
    ["Heavy", 90, MEANING.heavy],
    ["Ridge", 96, MEANING.ridge],
    ["Severe", 104, MEANING.severe],
    ["Extreme", 115, MEANING.extreme],
  ],
  "swim:pace": [
    ["Easy", 0, MEANING.easy],
    ["Steady", 84, MEANING.steady],
    ["Heavy", 92, MEANING.heavy],
    ["Ridge", 97, MEANING.ridge],
    ["Severe", 103, MEANING.severe],
    ["Extreme", 110, MEANING.extreme],
  ],
};

export function parseBandSetKey(key: string): { sport: BandSport; metric: Metric } | null {
  if (!(BAND_SET_KEYS as readonly string[]).includes(key)) return null;
  const [sport, metric] = key.split(":") as [BandSport, Metric];
  return { sport, metric };
}

/** Band rows from lower boundaries: each band runs to the next one's start; the last is open. */
export function bandsFromStarts(rows: readonly { name: string; fromPct: number; meaning: string }[]): Band[] {
  return rows.map((r, i) => ({
    name: r.name,
    fromPct: r.fromPct,
    toPct: i + 1 < rows.length ? rows[i + 1].fromPct : null,
    meaning: r.meaning,
  }));
}

export function defaultBandSet(key: BandSetKey): BandSet {
  const parsed = parseBandSetKey(key);
  if (!parsed) throw new TrainingInputError("out_of_range", `No band set for ${key}.`);
  return {
    key,
    ...parsed,
    bands: bandsFromStarts(DEFAULTS[key].map(([name, fromPct, meaning]) => ({ name, fromPct, meaning }))),
    isDefault: true,
  };
}

export function defaultBandSets(): Record<BandSetKey, BandSet> {
  return Object.fromEntries(BAND_SET_KEYS.map((k) => [k, defaultBandSet(k)])) as Record<BandSetKey, BandSet>;
}

/** The band set key for a session's sport and metric; bike pace and swim heart rate fall back to the nearest set we keep. */
export function bandSetKeyFor(sport: string, metric: Metric): BandSetKey {
  if (metric === "power") return "bike:power";
  if (metric === "pace") return sport === "swim" ? "swim:pace" : "run:pace";
  return sport === "run" ? "run:heart_rate" : "bike:heart_rate";
}

// Floating point: 80 % of 250 W computed as 200/250*100 must still count as 80 %, not 79.99999999999999.
const EPS = 1e-9;

/** Index of the band an intensity (in % of threshold) falls in, by the [from, to) convention above. */
export function bandIndexOf(pct: number, bands: readonly Band[]): number {
  if (!Number.isFinite(pct) || pct < 0) throw new TrainingInputError("out_of_range", "Intensity must be 0 % or more.");
  for (let i = bands.length - 1; i >= 0; i--) if (pct + EPS >= bands[i].fromPct) return i;
  return 0;
}

/** The band an intensity (in % of threshold) falls in. */
export function bandOf(pct: number, set: { bands: readonly Band[] }): Band {
  return set.bands[bandIndexOf(pct, set.bands)];
}

/** Percent of threshold for an absolute value: for pace (s/km), percent of threshold speed. */
export function intensityPct(metric: Metric, value: number, threshold: number): number {
  const v = requirePositive(value, "Value");
  const t = requirePositive(threshold, "Threshold");
  return metric === "pace" ? (t / v) * 100 : (v / t) * 100;
}

/** The band of an absolute value (W, bpm, or s per km) for a threshold in the same unit. */
export function bandOfValue(value: number, threshold: number, set: { metric: Metric; bands: readonly Band[] }): Band {
  return bandOf(intensityPct(set.metric, value, threshold), set);
}

// The single-hue ramp of DESIGN §6: pale teal to deep teal; brick marks the bands that start at or above threshold.
const PALE = [0xe3, 0xee, 0xec];
const DEEP = [0x12, 0x3d, 0x3a];
export const BRICK = "#B5523B";

/** The shade of band `index` of `count`: evenly spaced along the pale-to-deep teal ramp. */
export function bandShade(index: number, count: number): string {
  const t = count <= 1 ? 1 : Math.min(1, Math.max(0, index / (count - 1)));
  return (
    "#" +
    PALE.map((p, i) =>
      Math.round(p + (DEEP[i] - p) * t)
        .toString(16)
        .padStart(2, "0"),
    ).join("")
  );
}

/** True when the whole band lies at or above threshold: it is drawn with a brick edge. */
export function bandAboveThreshold(band: Band): boolean {
  return band.fromPct >= 100;
}

/** Shade for an intensity directly (profiles, charts). */
export function shadeOfPct(pct: number, bands: readonly Band[]): string {
  return bandShade(bandIndexOf(Math.max(0, pct), bands), bands.length);
}

/**
 * Seconds at each whole value of a 1 Hz channel (watts or bpm rounded to 1, the units targets are shown in); zero and
 * missing samples are left out. Stored once per ride file, it lets time in band follow a later threshold or band edit
 * without reading the file again.
 */
export function valueHistogram(values: readonly (number | null | undefined)[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const v of values) {
    if (typeof v !== "number" || !(v > 0) || !Number.isFinite(v)) continue;
    const k = String(Math.round(v));
    out[k] = (out[k] ?? 0) + 1;
  }
  return out;
}

/** Minutes in each band of `set` from a value histogram (seconds per whole W or bpm) and the threshold that applied. */
export function minutesPerBand(
  histogram: Record<string, number>,
  threshold: number,
  set: { metric: Metric; bands: readonly Band[] },
): number[] {
  const t = requirePositive(threshold, "Threshold");
  const out = new Array(set.bands.length).fill(0);
  for (const [k, seconds] of Object.entries(histogram)) {
    const v = Number(k);
    if (!(v > 0) || !(seconds > 0)) continue;
    out[bandIndexOf(intensityPct(set.metric, v, t), set.bands)] += seconds / 60;
  }
  return out;
}

export interface BandRow {
  name: string;
  meaning: string;
  fromPct: number;
  toPct: number | null;
  shade: string;
  aboveThreshold: boolean;
  /** The band in the metric's unit, as athletes read it ("up to 159 W", "160–199 W", "above 341 W"). */
  range: string;
  /** Lowest and highest absolute value in the band (whole W or bpm, whole s per km for pace); null where open. */
  lo: number | null;
  hi: number | null;
}

/**
 * Absolute ranges of a band set for a threshold, in the unit athletes read: whole watts, whole bpm, whole seconds
 * per km. With the [from, to) convention a band's highest whole value is the one just below the next band's lowest,
 * so the rows never share a number and classifying any shown number gives the band it is shown in.
 */
export function bandRows(
  set: { metric: Metric; bands: readonly Band[] },
  threshold: number,
  format: (v: number) => string,
): BandRow[] {
  const t = requirePositive(threshold, "Threshold");
  const n = set.bands.length;
  return set.bands.map((b, i) => {
    let lo: number | null;
    let hi: number | null;
    if (set.metric === "pace") {
      // Faster pace is fewer seconds: the band's slowest whole second is the largest s with t/s ≥ from, its fastest
      // the smallest s with t/s < to.
      lo = b.toPct === null ? null : Math.floor((t * 100) / b.toPct + EPS) + 1; // fastest
      hi = b.fromPct === 0 ? null : Math.floor((t * 100) / b.fromPct + EPS); // slowest
    } else {
      lo = b.fromPct === 0 ? null : Math.ceil((b.fromPct * t) / 100 - EPS);
      hi = b.toPct === null ? null : Math.ceil((b.toPct * t) / 100 - EPS) - 1;
    }
    let range: string;
    if (set.metric === "pace") {
      // lo is the fastest whole second in the band, hi the slowest.
      range =
        hi === null
          ? `${format(lo!)} or slower`
          : lo === null
            ? `${format(hi)} or faster`
            : `${format(hi)} – ${format(lo)}`;
    } else {
      range =
        lo === null
          ? `up to ${format(hi!)}`
          : hi === null
            ? `${format(lo)} and above`
            : `${format(lo)} – ${format(hi)}`;
    }
    return {
      name: b.name,
      meaning: b.meaning,
      fromPct: b.fromPct,
      toPct: b.toPct,
      shade: bandShade(i, n),
      aboveThreshold: bandAboveThreshold(b),
      range,
      lo,
      hi,
    };
  });
}

export interface BandInputRow {
  name: string;
  fromPct: string;
  toPct: string;
  meaning: string;
}

export type BandSetErrors = {
  form?: string;
  rows: Record<number, Partial<Record<"name" | "fromPct" | "toPct" | "meaning", string>>>;
};

/**
 * Checks a coach's band set as typed: 3–8 bands, a name each, whole-number boundaries in order with no gap and no
 * overlap, starting at 0 % and open at the top. Returns the bands, or messages keyed by row and field.
 */
export function validateBandSet(
  rows: readonly BandInputRow[],
): { ok: true; bands: Band[] } | { ok: false; errors: BandSetErrors } {
  const errors: BandSetErrors = { rows: {} };
  const put = (i: number, field: "name" | "fromPct" | "toPct" | "meaning", msg: string) => {
    errors.rows[i] ??= {};
    errors.rows[i][field] ??= msg;
  };
  if (rows.length < MIN_BANDS) errors.form = `A band set needs at least ${MIN_BANDS} bands.`;
  if (rows.length > MAX_BANDS) errors.form = `A band set has at most ${MAX_BANDS} bands.`;
  const num = (s: string) => (/^\s*\d+\s*$/.test(s) ? Number(s) : NaN);
  const parsed = rows.map((r, i) => {
    const name = r.name.trim();
    if (!name) put(i, "name", "Give the band a name.");
    else if (name.length > 24) put(i, "name", "Keep the name to 24 characters.");
    else if (/^\s*[A-Za-z]{1,2}\s*\d+[a-z]?\s*$/.test(name)) put(i, "name", "Use a word, not a code.");
    if (r.meaning.length > 140) put(i, "meaning", "Keep the meaning to one line (140 characters).");
    const from = num(r.fromPct);
    const to = i === rows.length - 1 && r.toPct.trim() === "" ? null : num(r.toPct);
    if (Number.isNaN(from)) put(i, "fromPct", "Type a whole number of percent.");
    if (to !== null && Number.isNaN(to))
      put(i, "toPct", i === rows.length - 1 ? "Leave the top band open (empty)." : "Type a whole number of percent.");
    return { name, from, to, meaning: r.meaning.trim() };
  });
  parsed.forEach((p, i) => {
    if (i === 0 && !Number.isNaN(p.from) && p.from !== 0) put(i, "fromPct", "The first band starts at 0 %.");
    if (i === parsed.length - 1 && p.to !== null && !Number.isNaN(p.to))
      put(i, "toPct", "Leave the top band open (empty).");
    if (p.to !== null && !Number.isNaN(p.to) && !Number.isNaN(p.from) && p.to <= p.from)
      put(i, "toPct", "The upper boundary must be above the lower one.");
    if (!Number.isNaN(p.from) && p.from > MAX_BOUNDARY_PCT)
      put(i, "fromPct", `Boundaries go up to ${MAX_BOUNDARY_PCT} %.`);
    if (i > 0) {
      const prev = parsed[i - 1];
      if (prev.to !== null && !Number.isNaN(prev.to) && !Number.isNaN(p.from)) {
        if (p.from > prev.to) put(i, "fromPct", `Gap: the band above ends at ${prev.to} %; start this one there.`);
        if (p.from < prev.to) put(i, "fromPct", `Overlap: the band above ends at ${prev.to} %; start this one there.`);
      }
      if (!Number.isNaN(prev.from) && !Number.isNaN(p.from) && p.from <= prev.from)
        put(i, "fromPct", "Bands must go up in order.");
    }
  });
  const names = parsed.map((p) => p.name.toLowerCase());
  names.forEach((n, i) => {
    if (n && names.indexOf(n) !== i) put(i, "name", "Two bands have this name.");
  });
  if (errors.form || Object.keys(errors.rows).length) return { ok: false, errors };
  return { ok: true, bands: parsed.map((p) => ({ name: p.name, fromPct: p.from, toPct: p.to, meaning: p.meaning })) };
}

/** A stored set is trusted only if it still passes the checks; otherwise the default is used. */
export function bandSetFromStored(key: BandSetKey, stored: unknown): BandSet {
  if (!Array.isArray(stored)) return defaultBandSet(key);
  const rows = stored.map((b: Partial<Band>) => ({
    name: String(b?.name ?? ""),
    fromPct: String(b?.fromPct ?? ""),
    toPct: b?.toPct == null ? "" : String(b.toPct),
    meaning: String(b?.meaning ?? ""),
  }));
  const v = validateBandSet(rows);
  if (!v.ok) return defaultBandSet(key);
  return { ...defaultBandSet(key), bands: v.bands, isDefault: false };
}
