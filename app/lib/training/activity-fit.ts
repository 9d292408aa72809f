import FitParser from "fit-file-parser";
import { TrainingInputError } from "./errors";
import { num, rawSeries, reading, type RawLap, type RawRead } from "./activity-series";

/** FIT activity files, decoded with fit-file-parser; record messages carry the samples. */
export function readFit(bytes: Uint8Array): RawRead {
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
