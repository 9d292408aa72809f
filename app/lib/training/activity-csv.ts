import Papa from "papaparse";
import { TrainingInputError } from "./errors";
import { rawSeries, reading, timeMs, type RawLap, type RawRead } from "./activity-series";

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

export function readCsv(text: string): RawRead {
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
