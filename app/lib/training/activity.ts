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

/** A raw reading at an elapsed time in seconds (not yet at 1 Hz). */
interface RawPoint {
  t: number;
  power?: number;
  hr?: number;
  cadence?: number;
  speed?: number;
  distance?: number;
}

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
  let points: RawPoint[];
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
function withLaps(activity: Activity, laps: RawLap[], points: RawPoint[]): Activity {
  if (laps.length < 2) return activity;
  let t0 = Infinity;
  for (const p of points) if (Number.isFinite(p.t) && p.t >= 0 && p.t < t0) t0 = p.t;
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

function readCsv(text: string): { points: RawPoint[]; startTime: string | null; laps: RawLap[] } {
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
  const points: RawPoint[] = [];
  // A lap column: a new lap begins on the row where its value changes.
  const laps: RawLap[] = [];
  let lapValue: string | null = null;
  rows.forEach((row, i) => {
    let t: number | undefined = i;
    if (col.time !== undefined) {
      const raw = row[col.time];
      const asNumber = num(raw);
      if (asNumber !== undefined) t = asNumber;
      else {
        const ms = Date.parse(raw);
        if (Number.isNaN(ms)) return; // a row whose time cannot be read is skipped
        startMs ??= ms;
        t = (ms - startMs) / 1000;
      }
    }
    const p: RawPoint = { t };
    if (col.power !== undefined) p.power = num(row[col.power]);
    if (col.hr !== undefined) p.hr = num(row[col.hr]);
    if (col.cadence !== undefined) p.cadence = num(row[col.cadence]);
    if (col.speed !== undefined) p.speed = num(row[col.speed]);
    else if (col.speedKmh !== undefined) p.speed = scale(num(row[col.speedKmh]), 1 / 3.6);
    if (col.distance !== undefined) p.distance = num(row[col.distance]);
    else if (col.distanceKm !== undefined) p.distance = scale(num(row[col.distanceKm]), 1000);
    if (col.lap !== undefined) {
      const v = String(row[col.lap] ?? "").trim();
      if (v !== "" && v !== lapValue) {
        if (laps.length) laps[laps.length - 1].endT = t;
        laps.push({ startT: t, endT: t + 1 });
        lapValue = v;
      } else if (laps.length) laps[laps.length - 1].endT = t + 1;
    }
    points.push(p);
  });
  if (points.length === 0)
    throw new TrainingInputError("unreadable_file", "No row of the CSV file has a readable time.");
  return { points, startTime: startMs === null ? null : new Date(startMs).toISOString(), laps };
}

const scale = (v: number | undefined, k: number) => (v === undefined ? undefined : v * k);

/**
 * GPX 1.1 track points, with the common extension tags for heart rate, cadence and power (any namespace prefix).
 * A scanner over the text rather than a document parser: a 4-hour file is several megabytes of XML of which only
 * each point's attributes, time and extension leaves matter, and building the whole tree took 30× the time of
 * reading the same samples from CSV. tests/unit/gpx-scanner.test.ts checks it against a general-purpose XML
 * parser on many shapes of file.
 */
export function readGpx(text: string): { points: RawPoint[]; startTime: string | null; laps: RawLap[] } {
  if (!/<(?:[\w.-]+:)?gpx[\s>]/i.test(text))
    throw new TrainingInputError("unreadable_file", "This is not a GPX file (no <gpx> element).");
  // Only the file's end is looked at: an end-anchored pattern over a multi-megabyte text would try every position.
  if (!/<\/(?:[\w.-]+:)?gpx\s*>\s*$/.test(text.trimEnd().slice(-1024)))
    throw notWellFormed("the file ends before its closing </gpx> tag");
  const open = /<(?:[\w.-]+:)?trkpt\b([^>]*)>/g;
  let startMs: number | null = null;
  let prev: { lat: number; lon: number; t: number } | null = null;
  let distance = 0;
  let found = 0;
  const points: RawPoint[] = [];
  // Track segments mark laps (several <trkseg> in one track); each point belongs to the last segment opened before it.
  const segStarts: number[] = [];
  for (const seg of text.matchAll(/<(?:[\w.-]+:)?trkseg[\s>]/g)) segStarts.push(seg.index!);
  const laps: RawLap[] = [];
  let seg = -1;
  for (let m = open.exec(text); m; m = open.exec(text)) {
    found++;
    const at = m.index;
    const attrs = m[1];
    let body = "";
    if (!attrs.endsWith("/")) {
      const close = text.indexOf("trkpt>", open.lastIndex);
      // The closing tag is "</trkpt>" or "</prefix:trkpt>"; the character before the name must end "</" or ":".
      if (close < 0 || !isClosingTag(text, close)) throw notWellFormed("a track point is not closed");
      body = text.slice(open.lastIndex, text.lastIndexOf("<", close));
      open.lastIndex = close + 6;
    }
    const time = /<(?:[\w.-]+:)?time\s*>([^<]*)</.exec(body);
    const ms = Date.parse((time?.[1] ?? "").trim());
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
    const lat = num(attribute(attrs, LAT));
    const lon = num(attribute(attrs, LON));
    const ext = extensionLeaves(body);
    const p: RawPoint = {
      t,
      hr: num(ext.hr ?? ext.heartrate),
      cadence: num(ext.cad ?? ext.cadence),
      power: num(ext.power ?? ext.powerinwatts ?? ext.watts),
    };
    if (lat !== undefined && lon !== undefined) {
      if (prev) {
        const step = haversine(prev.lat, prev.lon, lat, lon);
        distance += step;
        const dt = t - prev.t;
        p.speed = dt > 0 ? step / dt : undefined;
      }
      p.distance = distance;
      prev = { lat, lon, t };
    }
    points.push(p);
  }
  if (found === 0) throw new TrainingInputError("empty_file", "The GPX file has no track points.");
  if (points.length === 0) throw new TrainingInputError("unreadable_file", "No GPX track point has a readable time.");
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

const attributePattern = (name: string) => new RegExp(`(?:^|\\s)${name}\\s*=\\s*(?:"([^"]*)"|'([^']*)')`);
const LAT = attributePattern("lat");
const LON = attributePattern("lon");

function attribute(attrs: string, pattern: RegExp): string | undefined {
  const m = pattern.exec(attrs);
  return m ? (m[1] ?? m[2]) : undefined;
}

/** Extension tags nest differently per writer; their leaf names (lower case, prefix dropped) are what matters. */
function extensionLeaves(body: string): Record<string, string> {
  const out: Record<string, string> = {};
  const at = body.search(/<(?:[\w.-]+:)?extensions\s*>/);
  if (at < 0) return out;
  const leaf = /<(?:[\w.-]+:)?([\w.-]+)(?:\s[^>]*)?>([^<]*)<\/(?:[\w.-]+:)?\1\s*>/g;
  leaf.lastIndex = at;
  for (let m = leaf.exec(body); m; m = leaf.exec(body)) out[m[1].toLowerCase()] = m[2];
  return out;
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
function readFit(bytes: Uint8Array): { points: RawPoint[]; startTime: string | null; laps: RawLap[] } {
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
  const points = records.map((r) => ({
    t: (ms(r.timestamp) - startMs) / 1000,
    power: num(r.power),
    hr: num(r.heart_rate),
    cadence: num(r.cadence),
    speed: num(r.enhanced_speed ?? r.speed),
    distance: num(r.distance),
  }));
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
function resample(raw: RawPoint[], format: Activity["meta"]["format"], startTime: string | null): Activity {
  // Column-wise in typed arrays: a 4-hour file is tens of thousands of points, and an object per point per step
  // (clean copy, sort, fill) made this the largest cost after decoding. NaN marks a missing reading.
  let kept = 0;
  let sorted = true;
  let lastT = -Infinity;
  const ts = new Float64Array(raw.length);
  const cols = CHANNELS.map(() => new Float64Array(raw.length));
  for (const p of raw) {
    const t = p.t;
    if (!Number.isFinite(t) || t < 0) continue;
    if (t < lastT) sorted = false;
    lastT = t;
    ts[kept] = t;
    for (let c = 0; c < CHANNELS.length; c++) {
      const v = p[CHANNELS[c]];
      const [lo, hi] = PLAUSIBLE[CHANNELS[c]];
      cols[c][kept] = v !== undefined && v >= lo && v <= hi ? v : NaN;
    }
    kept++;
  }
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
  const samples: Sample[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const s: Sample = { t: i };
    for (let c = 0; c < channels.length; c++) {
      const v = filled[c][i];
      s[channels[c]] = Number.isNaN(v) ? null : v;
    }
    samples[i] = s;
  }
  return {
    samples,
    meta: { format, startTime, durationS: n, channels, sourcePoints: raw.length, interpolatedS, stoppedS },
  };
}
