import { TrainingInputError } from "./errors";
import { CHANNELS, type Activity, type Channel, type RawLap, type RawSeries, type Sample } from "./activity-series";

/**
 * Gap rule: recordings skip seconds (smart recording, dropouts, auto-pause). A gap of up to SHORT_GAP_S seconds
 * is filled by linear interpolation of every channel; inside a longer gap the rider is taken to be stopped:
 * power 0 (so averages over the gap are not inflated), cadence 0, and heart rate, speed and distance missing.
 */
export const SHORT_GAP_S = 5;
const MAX_DURATION_S = 24 * 3600;

/** Puts the file's laps on the 1 Hz grid (second 0 = the first reading); fewer than two laps are dropped. */
export function withLaps(activity: Activity, laps: RawLap[], points: RawSeries): Activity {
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

const PLAUSIBLE: Record<Channel, [number, number]> = {
  power: [0, 3000],
  hr: [25, 250],
  cadence: [0, 250],
  speed: [0, 40],
  distance: [0, 1_000_000],
};
/** Resamples to one sample per whole second from 0 to the last reading, applying the gap rule. */
export function resample(raw: RawSeries, format: Activity["meta"]["format"], startTime: string | null): Activity {
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
