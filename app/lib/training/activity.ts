import { TrainingInputError } from "./errors";
import type { Activity, RawLap, RawSeries } from "./activity-series";
import { readCsv } from "./activity-csv";
import { readFit } from "./activity-fit";
import { readGpx } from "./activity-gpx";
import { resample, withLaps } from "./activity-resample";

export type { Activity, Channel, Sample } from "./activity-series";
export { CSV_HEADERS } from "./activity-csv";
export { SHORT_GAP_S } from "./activity-resample";

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
function asText(data: Uint8Array | string): string {
  if (typeof data === "string") return data;
  const text = new TextDecoder("utf-8", { fatal: false }).decode(data);
  if (text.includes("\u0000"))
    throw new TrainingInputError("unreadable_file", "This is not a text file; is it a FIT file with the wrong name?");
  return text;
}
