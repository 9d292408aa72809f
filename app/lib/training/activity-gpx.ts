/**
 * The GPX reader and the character-level scanner it runs on. Over 300 lines because the scanner's helpers (tag,
 * comment and CDATA stepping) serve only this reader and share its invariants; apart, neither half reads alone.
 */
import { TrainingInputError } from "./errors";
import { rawSeries, reading, timeMs, type RawLap, type RawRead } from "./activity-series";

/**
 * GPX 1.1 track points, with the common extension tags for heart rate, cadence and power (any namespace prefix).
 * A scanner over the text rather than a document parser: a 4-hour file is several megabytes of XML of which only
 * each point's attributes, time and extension leaves matter, and building the whole tree took 30× the time of
 * reading the same samples from CSV. It finds tags with indexOf and reads them by character codes: a regular
 * expression per point (and a Date.parse) cost several times more. Comments and CDATA sections are stepped over
 * as XML does (a commented-out point is no point); a point holding them is read from a cleaned copy.
 * tests/unit/gpx-scanner.test.ts checks it against a general-purpose XML parser on many shapes of file.
 */
export function readGpx(text: string): RawRead {
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
