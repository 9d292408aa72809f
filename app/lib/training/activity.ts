import FitParser from "fit-file-parser";
import Papa from "papaparse";
import { TrainingInputError } from "./errors";

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
const CHANNELS: readonly Channel[] = ["power", "hr", "cadence", "speed", "distance"];

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
interface RawSeries {
  t: number[];
  power: number[];
  hr: number[];
  cadence: number[];
  speed: number[];
  distance: number[];
}

const rawSeries = (): RawSeries => ({ t: [], power: [], hr: [], cadence: [], speed: [], distance: [] });

/**
 * Gap rule: recordings skip seconds (smart recording, dropouts, auto-pause). A gap of up to SHORT_GAP_S seconds
 * is filled by linear interpolation of every channel; inside a longer gap the rider is taken to be stopped:
 * power 0 (so averages over the gap are not inflated), cadence 0, and heart rate, speed and distance missing.
 */
export const SHORT_GAP_S = 5;
const MAX_DURATION_S = 24 * 3600;

/**
 * Reads a ride or run file (CSV, GPX 1.1, FIT) into 1 Hz samples. The format comes from the file name's ending,
 * checked against the content. Throws a TrainingInputError saying why when the file cannot be used.
 */
export function parseActivity(data: Uint8Array | string, fileName: string): Activity {
  const ext = fileName.toLowerCase().split(".").pop() ?? "";
  const size = typeof data === "string" ? data.length : data.byteLength;
  if (size === 0) throw new TrainingInputError("empty_file", "The file is empty.");
  let points: RawSeries;
  let startTime: string | null = null;
  let laps: RawLap[] = [];
  let format: Activity["meta"]["format"];
  if (ext === "csv" || ext === "txt") {
    format = "csv";
    ({ points, startTime, laps } = readCsv(asText(data)));
  } else if (ext === "gpx") {
    format = "gpx";
    ({ points, startTime, laps } = readGpx(asText(data)));
  } else if (ext === "fit") {
    format = "fit";
    if (typeof data === "string") throw new TrainingInputError("unreadable_file", "A FIT file must be read as bytes.");
    ({ points, startTime, laps } = readFit(data));
  } else {
    throw new TrainingInputError("unsupported_file", "Use a CSV, GPX or FIT file.");
  }
  return withLaps(resample(points, format, startTime), laps, points);
}

/** A lap in the file's own seconds (the same clock as its points' `t`). */
type RawLap = { startT: number; endT: number };

/** Puts the file's laps on the 1 Hz grid (second 0 = the first reading); fewer than two laps are dropped. */
function withLaps(activity: Activity, laps: RawLap[], points: RawSeries): Activity {
  if (laps.length < 2) return activity;
  let t0 = Infinity;
  for (const t of points.t) if (Number.isFinite(t) && t >= 0 && t < t0) t0 = t;
  const n = activity.samples.length;
  const marks = laps
    .map((l) => ({ startS: Math.max(0, Math.round(l.startT - t0)), endS: Math.min(n, Math.round(l.endT - t0)) }))
    .filter((l) => l.endS > l.startS)
    .sort((a, b) => a.startS - b.startS);
  // Consecutive laps share their boundary; a writer's rounding must not make them overlap.
  for (let i = 1; i < marks.length; i++) if (marks[i].startS < marks[i - 1].endS) marks[i - 1].endS = marks[i].startS;
  const clean = marks.filter((l) => l.endS > l.startS);
  if (clean.length >= 2) activity.meta.laps = clean;
  return activity;
}

function asText(data: Uint8Array | string): string {
  if (typeof data === "string") return data;
  const text = new TextDecoder("utf-8", { fatal: false }).decode(data);
  if (text.includes("\u0000"))
    throw new TrainingInputError("unreadable_file", "This is not a text file; is it a FIT file with the wrong name?");
  return text;
}

const num = (v: unknown): number | undefined => {
  if (v === null || v === undefined || v === "") return undefined;
  const n = typeof v === "number" ? v : Number(String(v).trim().replace(",", "."));
  return Number.isFinite(n) ? n : undefined;
};

/**
 * `num` for one reading, NaN when missing. A plain number string is read directly: Number() already ignores the
 * same surrounding white space as trim(), and a decimal comma never gives a finite number, so only strings that
 * fail go through `num`'s trim and comma replacement (a new string each) and come out the same.
 */
function reading(v: unknown): number {
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

/**
 * CSV columns are matched by header, case and spaces ignored. Recognised names (first match wins):
 * time: time, secs, seconds, elapsed, elapsed_s, t, timestamp (seconds from start, or a date-time);
 * power: power, watts, power_w, pwr; heart rate: heart_rate, heartrate, hr, bpm, heart_rate_bpm;
 * cadence: cadence, cad, rpm; speed: speed (m/s), speed_mps, speed_kmh or kph (km/h); distance: distance (m),
 * distance_m, dist, distance_km or km (km). Without a time column, rows are taken as one per second.
 */
export const CSV_HEADERS = {
  time: ["time", "secs", "seconds", "elapsed", "elapsed_s", "t", "timestamp"],
  power: ["power", "watts", "power_w", "pwr"],
  hr: ["heart_rate", "heartrate", "hr", "bpm", "heart_rate_bpm"],
  cadence: ["cadence", "cad", "rpm"],
  speed: ["speed", "speed_mps"],
  speedKmh: ["speed_kmh", "kph"],
  distance: ["distance", "distance_m", "dist"],
  distanceKm: ["distance_km", "km"],
  lap: ["lap", "lap_number", "laps", "segment"],
} as const;

function readCsv(text: string): { points: RawSeries; startTime: string | null; laps: RawLap[] } {
  // Array mode is markedly faster than papaparse's header mode; columns are found by index instead.
  const parsed = Papa.parse<string[]>(text.trim(), { skipEmptyLines: true });
  const [header = [], ...body] = parsed.data;
  const fields = header.map((h) =>
    String(h)
      .trim()
      .toLowerCase()
      .replace(/[\s-]+/g, "_")
      .replace(/[()/]/g, ""),
  );
  const pick = (names: readonly string[]) => {
    const name = names.find((n) => fields.includes(n));
    return name === undefined ? undefined : fields.indexOf(name);
  };
  const col = {
    time: pick(CSV_HEADERS.time),
    power: pick(CSV_HEADERS.power),
    hr: pick(CSV_HEADERS.hr),
    cadence: pick(CSV_HEADERS.cadence),
    speed: pick(CSV_HEADERS.speed),
    speedKmh: pick(CSV_HEADERS.speedKmh),
    distance: pick(CSV_HEADERS.distance),
    distanceKm: pick(CSV_HEADERS.distanceKm),
    lap: pick(CSV_HEADERS.lap),
  };
  if (
    col.power === undefined &&
    col.hr === undefined &&
    col.speed === undefined &&
    col.speedKmh === undefined &&
    col.cadence === undefined
  ) {
    throw new TrainingInputError(
      "unreadable_file",
      `No power, heart-rate, cadence or speed column found. Columns seen: ${fields.slice(0, 8).join(", ") || "none"}.`,
    );
  }
  const rows = body;
  if (rows.length === 0) throw new TrainingInputError("empty_file", "The CSV file has a header but no rows.");
  let startMs: number | null = null;
  const points = rawSeries();
  // A lap column: a new lap begins on the row where its value changes.
  const laps: RawLap[] = [];
  let lapValue: string | null = null;
  for (let i = 0; i < rows.length; i++) {
    const row = rows[i];
    let t: number = i;
    if (col.time !== undefined) {
      const raw = row[col.time];
      const asNumber = reading(raw);
      if (!Number.isNaN(asNumber)) t = asNumber;
      else {
        const ms = typeof raw === "string" ? timeMs(raw) : NaN;
        if (Number.isNaN(ms)) continue; // a row whose time cannot be read is skipped
        startMs ??= ms;
        t = (ms - startMs) / 1000;
      }
    }
    points.t.push(t);
    if (col.power !== undefined) points.power.push(reading(row[col.power]));
    if (col.hr !== undefined) points.hr.push(reading(row[col.hr]));
    if (col.cadence !== undefined) points.cadence.push(reading(row[col.cadence]));
    if (col.speed !== undefined) points.speed.push(reading(row[col.speed]));
    else if (col.speedKmh !== undefined) points.speed.push(reading(row[col.speedKmh]) * (1 / 3.6));
    if (col.distance !== undefined) points.distance.push(reading(row[col.distance]));
    else if (col.distanceKm !== undefined) points.distance.push(reading(row[col.distanceKm]) * 1000);
    if (col.lap !== undefined) {
      const v = String(row[col.lap] ?? "").trim();
      if (v !== "" && v !== lapValue) {
        if (laps.length) laps[laps.length - 1].endT = t;
        laps.push({ startT: t, endT: t + 1 });
        lapValue = v;
      } else if (laps.length) laps[laps.length - 1].endT = t + 1;
    }
  }
  if (points.t.length === 0)
    throw new TrainingInputError("unreadable_file", "No row of the CSV file has a readable time.");
  return { points, startTime: startMs === null ? null : new Date(startMs).toISOString(), laps };
}

/**
 * GPX 1.1 track points, with the common extension tags for heart rate, cadence and power (any namespace prefix).
 * A scanner over the text rather than a document parser: a 4-hour file is several megabytes of XML of which only
 * each point's attributes, time and extension leaves matter, and building the whole tree took 30× the time of
 * reading the same samples from CSV. It finds tags with indexOf and reads them by character codes: a regular
 * expression per point (and a Date.parse) cost several times more. Comments and CDATA sections are stepped over
 * as XML does (a commented-out point is no point); a point holding them is read from a cleaned copy.
 * tests/unit/gpx-scanner.test.ts checks it against a general-purpose XML parser on many shapes of file.
 */
export function readGpx(text: string): { points: RawSeries; startTime: string | null; laps: RawLap[] } {
  if (!/<(?:[\w.-]+:)?gpx[\s>]/i.test(text))
    throw new TrainingInputError("unreadable_file", "This is not a GPX file (no <gpx> element).");
  // Only the file's end is looked at: an end-anchored pattern over a multi-megabyte text would try every position.
  if (!/<\/(?:[\w.-]+:)?gpx\s*>\s*$/.test(text.trimEnd().slice(-1024)))
    throw notWellFormed("the file ends before its closing </gpx> tag");
  let startMs: number | null = null;
  let prevLat = NaN;
  let prevLon = NaN;
  let prevT = NaN;
  let distance = 0;
  let found = 0;
  const points = rawSeries();
  // Track segments mark laps (several <trkseg> in one track); each point belongs to the last segment opened before it.
  const segStarts: number[] = [];
  const sections = unparsedSections(text);
  const segSkip = cursor(sections);
  for (let pos = 0, j = findTag(text, "trkseg", 0); j >= 0; j = findTag(text, "trkseg", pos)) {
    const lt = text.lastIndexOf("<", j);
    const skip = segSkip(pos);
    if (skip && skip[0] < lt) {
      pos = skip[1];
      continue;
    }
    if (isSpaceOrGt(text.charCodeAt(j + 6))) segStarts.push(lt);
    pos = j + 6;
  }
  const laps: RawLap[] = [];
  let seg = -1;
  const skipAt = cursor(sections);
  const ext: Leaves = {};
  let pos = 0;
  for (let j = findTag(text, "trkpt", 0); j >= 0; j = findTag(text, "trkpt", pos)) {
    const at = text.lastIndexOf("<", j);
    const skip = skipAt(pos);
    if (skip && skip[0] < at) {
      pos = skip[1];
      continue;
    }
    const attrsStart = j + 5;
    const gt = text.indexOf(">", attrsStart);
    if (gt < 0) break;
    found++;
    let body = "";
    pos = gt + 1;
    if (text.charCodeAt(gt - 1) !== 47 /* / */ || gt === attrsStart) {
      const first = skipAt(pos);
      let close = text.indexOf("trkpt>", pos);
      for (let s = first; close >= 0 && s && s[0] < close; s = skipAt(s[1])) {
        if (s[1] > close) close = text.indexOf("trkpt>", s[1]);
      }
      // The closing tag is "</trkpt>" or "</prefix:trkpt>"; the character before the name must end "</" or ":".
      if (close < 0 || !isClosingTag(text, close)) throw notWellFormed("a track point is not closed");
      const bodyEnd = text.lastIndexOf("<", close);
      body = text.slice(pos, bodyEnd);
      if (first && first[0] < bodyEnd) body = withoutUnparsed(body);
      pos = close + 6;
    }
    const ms = timeMs(elementText(body, "time").trim());
    if (Number.isNaN(ms)) continue;
    startMs ??= ms;
    const t = (ms - startMs) / 1000;
    let inSeg = seg;
    while (inSeg + 1 < segStarts.length && segStarts[inSeg + 1] < at) inSeg++;
    if (inSeg !== seg) {
      if (laps.length) laps[laps.length - 1].endT = t;
      laps.push({ startT: t, endT: t + 1 });
      seg = inSeg;
    } else if (laps.length) laps[laps.length - 1].endT = t + 1;
    const lat = reading(attribute(text, attrsStart, gt, "lat"));
    const lon = reading(attribute(text, attrsStart, gt, "lon"));
    extensionLeaves(body, ext);
    points.t.push(t);
    points.hr.push(reading(ext.hr ?? ext.heartrate));
    points.cadence.push(reading(ext.cad ?? ext.cadence));
    points.power.push(reading(ext.power ?? ext.powerinwatts ?? ext.watts));
    let speed = NaN;
    let dist = NaN;
    if (!Number.isNaN(lat) && !Number.isNaN(lon)) {
      if (!Number.isNaN(prevT)) {
        const step = haversine(prevLat, prevLon, lat, lon);
        distance += step;
        const dt = t - prevT;
        speed = dt > 0 ? step / dt : NaN;
      }
      dist = distance;
      prevLat = lat;
      prevLon = lon;
      prevT = t;
    }
    points.speed.push(speed);
    points.distance.push(dist);
  }
  if (found === 0) throw new TrainingInputError("empty_file", "The GPX file has no track points.");
  if (points.t.length === 0) throw new TrainingInputError("unreadable_file", "No GPX track point has a readable time.");
  return { points, startTime: new Date(startMs!).toISOString(), laps };
}

const notWellFormed = (why: string) =>
  new TrainingInputError("unreadable_file", `The GPX file is not well-formed XML: ${why}.`);

function isClosingTag(text: string, nameEnd: number): boolean {
  let i = nameEnd - 1;
  if (text[i] === "/" && text[i - 1] === "<") return true;
  if (text[i] !== ":") return false;
  while (i > 0 && text[i - 1] !== "<" && text[i - 1] !== ">") i--;
  return text[i - 1] === "<" && text[i] === "/";
}

/** [\w.-] of a regular expression without the u flag: the characters of a tag name or prefix. */
function isNameChar(c: number): boolean {
  return (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || (c >= 48 && c <= 57) || c === 95 || c === 46 || c === 45;
}

const isWordChar = (c: number) => isNameChar(c) && c !== 46 && c !== 45;

/** \s of a regular expression. */
function isSpace(c: number): boolean {
  return (
    c === 32 ||
    (c >= 9 && c <= 13) ||
    c === 0xa0 ||
    c === 0x1680 ||
    (c >= 0x2000 && c <= 0x200a) ||
    c === 0x2028 ||
    c === 0x2029 ||
    c === 0x202f ||
    c === 0x205f ||
    c === 0x3000 ||
    c === 0xfeff
  );
}

const isSpaceOrGt = (c: number) => c === 62 || isSpace(c);

/** Whether the name at `j` follows "<" or "<prefix:", as in an opening tag. */
function opensTag(text: string, j: number): boolean {
  let i = j - 1;
  const c = text.charCodeAt(i);
  if (c === 60) return true;
  if (c !== 58) return false;
  const end = --i;
  while (i >= 0 && isNameChar(text.charCodeAt(i))) i--;
  return i < end && text.charCodeAt(i) === 60;
}

/** The position of the next opening tag's local name `name` (whole word) from `from`, or -1. */
function findTag(text: string, name: string, from: number): number {
  for (let j = text.indexOf(name, from); j >= 0; j = text.indexOf(name, j + 1))
    if (opensTag(text, j) && !isWordChar(text.charCodeAt(j + name.length))) return j;
  return -1;
}

/**
 * Comments and CDATA sections hold text that may look like markup but is not. They are found in one pass over the
 * text (a search for "<!"; four separate searches of a multi-megabyte file for markers it lacks cost a few
 * milliseconds each). Returns a finder of the first one starting at or after a position, as [start, end); the
 * positions asked for must not go backwards.
 */
function unparsed(text: string): (from: number) => [number, number] | null {
  return cursor(unparsedSections(text));
}

function unparsedSections(text: string): [number, number][] {
  const found: [number, number][] = [];
  for (let i = text.indexOf("<!"); i >= 0; i = text.indexOf("<!", i)) {
    const comment = text.startsWith("<!--", i);
    if (!comment && !text.startsWith("<![CDATA[", i)) {
      i += 2;
      continue;
    }
    const end = comment ? text.indexOf("-->", i + 4) : text.indexOf("]]>", i + 9);
    if (end < 0) throw notWellFormed(comment ? "a comment is not closed" : "a CDATA section is not closed");
    found.push([i, end + 3]);
    i = end + 3;
  }
  return found;
}

function cursor(found: [number, number][]): (from: number) => [number, number] | null {
  let k = 0;
  return (from) => {
    while (k < found.length && found[k][0] < from) k++;
    return k < found.length ? found[k] : null;
  };
}

/** A point's inner markup with comments dropped and CDATA sections replaced by their (escaped) text. */
function withoutUnparsed(body: string): string {
  const next = unparsed(body);
  const parts: string[] = [];
  let pos = 0;
  for (let s = next(0); s; s = next(s[1])) {
    parts.push(body.slice(pos, s[0]));
    if (body.startsWith("<![CDATA[", s[0]))
      parts.push(
        body.slice(s[0] + 9, s[1] - 3).replace(/[&<>]/g, (c) => `&${{ "&": "amp", "<": "lt", ">": "gt" }[c]};`),
      );
    pos = s[1];
  }
  parts.push(body.slice(pos));
  return parts.join("");
}

/** The text of the first element `<name>` or `<prefix:name>` (no attributes) up to the next tag; "" when none. */
function elementText(body: string, name: string): string {
  for (let j = body.indexOf(name); j >= 0; j = body.indexOf(name, j + 1)) {
    if (!opensTag(body, j)) continue;
    let k = j + name.length;
    while (isSpace(body.charCodeAt(k))) k++;
    if (body.charCodeAt(k) !== 62) continue;
    const end = body.indexOf("<", k + 1);
    return end < 0 ? "" : body.slice(k + 1, end);
  }
  return "";
}

/** The value of attribute `name` in text[from, to) (either quote), or undefined. */
function attribute(text: string, from: number, to: number, name: string): string | undefined {
  for (let j = text.indexOf(name, from); j >= 0 && j < to; j = text.indexOf(name, j + 1)) {
    if (j > from && !isSpace(text.charCodeAt(j - 1))) continue;
    let k = j + name.length;
    while (k < to && isSpace(text.charCodeAt(k))) k++;
    if (k >= to || text.charCodeAt(k) !== 61 /* = */) continue;
    k++;
    while (k < to && isSpace(text.charCodeAt(k))) k++;
    const q = text.charCodeAt(k);
    if (k >= to || (q !== 34 && q !== 39)) continue;
    const end = text.indexOf(q === 34 ? '"' : "'", k + 1);
    if (end < 0 || end >= to) continue;
    return text.slice(k + 1, end);
  }
  return undefined;
}

/** The extension leaves read, by lower-case local name. */
interface Leaves {
  hr?: string;
  heartrate?: string;
  cad?: string;
  cadence?: string;
  power?: string;
  powerinwatts?: string;
  watts?: string;
}

/**
 * Extension tags nest differently per writer; their leaf names (lower case, prefix dropped) are what matters. A leaf
 * is `<name ...>text</name>` (either tag may carry a prefix); the last of a name wins. Fills `out` in place.
 */
function extensionLeaves(body: string, out: Leaves): void {
  out.hr = out.heartrate = out.cad = out.cadence = out.power = out.powerinwatts = out.watts = undefined;
  let at = -1;
  for (let j = body.indexOf("extensions"); j >= 0; j = body.indexOf("extensions", j + 1)) {
    if (!opensTag(body, j)) continue;
    let k = j + 10;
    while (isSpace(body.charCodeAt(k))) k++;
    if (body.charCodeAt(k) === 62) {
      at = body.lastIndexOf("<", j);
      break;
    }
  }
  if (at < 0) return;
  for (let lt = at; lt >= 0;) {
    const end = leafAt(body, lt, out);
    lt = body.indexOf("<", end < 0 ? lt + 1 : end);
  }
}

/** Reads a leaf element opening at body[lt] into `out`; returns the position after it, or -1 when none starts there. */
function leafAt(body: string, lt: number, out: Leaves): number {
  let nameStart = lt + 1;
  let nameEnd = nameStart;
  while (isNameChar(body.charCodeAt(nameEnd))) nameEnd++;
  if (nameEnd === nameStart) return -1;
  if (body.charCodeAt(nameEnd) === 58 /* : */) {
    nameStart = nameEnd + 1;
    nameEnd = nameStart;
    while (isNameChar(body.charCodeAt(nameEnd))) nameEnd++;
    if (nameEnd === nameStart) return -1;
  }
  const c = body.charCodeAt(nameEnd);
  const gt = c === 62 ? nameEnd : isSpace(c) ? body.indexOf(">", nameEnd + 1) : -1;
  if (gt < 0) return -1;
  const close = body.indexOf("<", gt + 1);
  if (close < 0 || body.charCodeAt(close + 1) !== 47 /* / */) return -1;
  // The closing name, after an optional prefix of its own.
  let p = close + 2;
  let run = p;
  while (isNameChar(body.charCodeAt(run))) run++;
  if (body.charCodeAt(run) === 58) p = run + 1;
  const length = nameEnd - nameStart;
  for (let i = 0; i < length; i++) if (body.charCodeAt(p + i) !== body.charCodeAt(nameStart + i)) return -1;
  let e = p + length;
  while (isSpace(body.charCodeAt(e))) e++;
  if (body.charCodeAt(e) !== 62) return -1;
  if (length <= 12) {
    const value = body.slice(gt + 1, close);
    switch (body.slice(nameStart, nameEnd).toLowerCase()) {
      case "hr":
        out.hr = value;
        break;
      case "heartrate":
        out.heartrate = value;
        break;
      case "cad":
        out.cad = value;
        break;
      case "cadence":
        out.cadence = value;
        break;
      case "power":
        out.power = value;
        break;
      case "powerinwatts":
        out.powerinwatts = value;
        break;
      case "watts":
        out.watts = value;
    }
  }
  return e + 1;
}

function haversine(lat1: number, lon1: number, lat2: number, lon2: number): number {
  const R = 6_371_000;
  const rad = Math.PI / 180;
  const dLat = (lat2 - lat1) * rad;
  const dLon = (lon2 - lon1) * rad;
  const a = Math.sin(dLat / 2) ** 2 + Math.cos(lat1 * rad) * Math.cos(lat2 * rad) * Math.sin(dLon / 2) ** 2;
  return 2 * R * Math.asin(Math.min(1, Math.sqrt(a)));
}

/** FIT activity files, decoded with fit-file-parser; record messages carry the samples. */
function readFit(bytes: Uint8Array): { points: RawSeries; startTime: string | null; laps: RawLap[] } {
  if (bytes.byteLength < 14 || String.fromCharCode(bytes[8], bytes[9], bytes[10], bytes[11]) !== ".FIT") {
    throw new TrainingInputError("unreadable_file", "This is not a FIT file (its header lacks the .FIT signature).");
  }
  const dataSize = bytes[4] | (bytes[5] << 8) | (bytes[6] << 16) | (bytes[7] << 24);
  if (bytes[0] + dataSize > bytes.byteLength) {
    throw new TrainingInputError(
      "unreadable_file",
      "The FIT file is cut short: it ends before the data its header announces.",
    );
  }
  let parsed: any = null;
  let error: string | undefined;
  const copy = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
  // The parser calls back synchronously; with force=false it reports a damaged file instead of guessing.
  new FitParser({ force: false, speedUnit: "m/s", lengthUnit: "m", mode: "list" }).parse(copy, (err, data) => {
    error = err;
    parsed = data;
  });
  if (error || !parsed)
    throw new TrainingInputError("unreadable_file", `The FIT file could not be read: ${error ?? "no data"}.`);
  const records: any[] = (parsed.records ?? []).filter((r: any) => r?.timestamp);
  if (records.length === 0) throw new TrainingInputError("empty_file", "The FIT file has no activity records.");
  // The parser gives Date objects already; copying each through new Date() only to read it back cost a
  // noticeable part of a long file.
  const ms = (v: unknown) => (v instanceof Date ? v.getTime() : new Date(v as string).getTime());
  const startMs = ms(records[0].timestamp);
  const points = rawSeries();
  for (const r of records) {
    points.t.push((ms(r.timestamp) - startMs) / 1000);
    points.power.push(reading(r.power));
    points.hr.push(reading(r.heart_rate));
    points.cadence.push(reading(r.cadence));
    points.speed.push(reading(r.enhanced_speed ?? r.speed));
    points.distance.push(reading(r.distance));
  }
  // Lap messages: start_time and elapsed time (or the lap's closing timestamp), on the records' clock.
  const laps: RawLap[] = (parsed.laps ?? [])
    .map((l: any) => {
      const start = l?.start_time ? new Date(l.start_time).getTime() : NaN;
      const elapsed = num(l?.total_elapsed_time) ?? num(l?.total_timer_time);
      const end = elapsed !== undefined ? start + elapsed * 1000 : l?.timestamp ? new Date(l.timestamp).getTime() : NaN;
      return { startT: (start - startMs) / 1000, endT: (end - startMs) / 1000 };
    })
    .filter((l: RawLap) => Number.isFinite(l.startT) && Number.isFinite(l.endT) && l.endT > l.startT);
  return { points, startTime: new Date(startMs).toISOString(), laps };
}

const PLAUSIBLE: Record<Channel, [number, number]> = {
  power: [0, 3000],
  hr: [25, 250],
  cadence: [0, 250],
  speed: [0, 40],
  distance: [0, 1_000_000],
};

/** Resamples to one sample per whole second from 0 to the last reading, applying the gap rule. */
function resample(raw: RawSeries, format: Activity["meta"]["format"], startTime: string | null): Activity {
  // Column-wise in typed arrays: a 4-hour file is tens of thousands of points, and an object per point per step
  // (clean copy, sort, fill) made this the largest cost after decoding. NaN marks a missing reading.
  const len = raw.t.length;
  let kept = 0;
  let sorted = true;
  let lastT = -Infinity;
  const ts = new Float64Array(len);
  const from = new Int32Array(len);
  for (let i = 0; i < len; i++) {
    const t = raw.t[i];
    if (!Number.isFinite(t) || t < 0) continue;
    if (t < lastT) sorted = false;
    lastT = t;
    ts[kept] = t;
    from[kept++] = i;
  }
  const cols = CHANNELS.map((c) => {
    const src = raw[c];
    const [lo, hi] = PLAUSIBLE[c];
    const col = new Float64Array(kept).fill(NaN);
    if (src.length)
      for (let k = 0; k < kept; k++) {
        const v = src[from[k]];
        if (v >= lo && v <= hi) col[k] = v;
      }
    return col;
  });
  if (kept === 0) throw new TrainingInputError("empty_file", "The file has no readings.");
  // Readings out of time order are put in order (stably, so equal times keep the file's order).
  let order: ArrayLike<number> | null = null;
  if (!sorted) order = Array.from({ length: kept }, (_, i) => i).sort((a, b) => ts[a] - ts[b]);
  const at = (i: number) => (order ? order[i] : i);
  const present = CHANNELS.map((_, c) => {
    for (let i = 0; i < kept; i++) if (!Number.isNaN(cols[c][i])) return true;
    return false;
  });
  const channels = CHANNELS.filter((_, c) => present[c]);
  if (channels.length === 0)
    throw new TrainingInputError("unreadable_file", "The file has no power, heart-rate, cadence or speed readings.");
  const t0 = ts[at(0)];
  const last = Math.floor(ts[at(kept - 1)] - t0);
  if (last > MAX_DURATION_S) throw new TrainingInputError("out_of_range", "The file lasts longer than 24 hours.");
  const n = last + 1;

  let interpolatedS = 0;
  let stoppedS = 0;
  const filled: Float64Array[] = [];
  for (const c of channels) {
    const col = cols[CHANNELS.indexOf(c)];
    // Average readings that land in the same second, then walk the known seconds and fill between them.
    const sum = new Float64Array(n);
    const count = new Uint16Array(n);
    for (let j = 0; j < kept; j++) {
      const k = at(j);
      const v = col[k];
      if (Number.isNaN(v)) continue;
      const i = Math.min(n - 1, Math.round(ts[k] - t0));
      sum[i] += v;
      count[i]++;
    }
    const out = new Float64Array(n).fill(NaN);
    let prevI = -1;
    for (let i = 0; i < n; i++) {
      if (count[i] === 0) continue;
      const v = sum[i] / count[i];
      out[i] = v;
      if (prevI >= 0 && i - prevI > 1) {
        const gap = i - prevI - 1;
        const from = out[prevI];
        for (let k = prevI + 1; k < i; k++) {
          if (gap <= SHORT_GAP_S) out[k] = from + ((v - from) * (k - prevI)) / (i - prevI);
          else if (c === "power" || c === "cadence") out[k] = 0;
        }
        if (c === channels[0]) {
          if (gap <= SHORT_GAP_S) interpolatedS += gap;
          else stoppedS += gap;
        }
      }
      prevI = i;
    }
    filled.push(out);
  }
  // Named stores in a fixed order give every sample the same shape (a computed key per channel did not).
  const column = (c: Channel) => {
    const at = channels.indexOf(c);
    return at < 0 ? null : filled[at];
  };
  const [power, hr, cadence, speed, distance] = CHANNELS.map(column);
  const value = (v: number) => (Number.isNaN(v) ? null : v);
  const samples: Sample[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const s: Sample = { t: i };
    if (power) s.power = value(power[i]);
    if (hr) s.hr = value(hr[i]);
    if (cadence) s.cadence = value(cadence[i]);
    if (speed) s.speed = value(speed[i]);
    if (distance) s.distance = value(distance[i]);
    samples[i] = s;
  }
  return {
    samples,
    meta: { format, startTime, durationS: n, channels, sourcePoints: len, interpolatedS, stoppedS },
  };
}
