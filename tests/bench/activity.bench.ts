import Papa from "papaparse";
import { parseActivity, powerCurve, STANDARD_WINDOWS_S } from "~/lib/training";
import { enduranceRide, toCsv, toFit, toGpx } from "../../db/demo/rides";
import { compare } from "./lib";

/** Parse + power curve (1 s to 60 min) of a 4-hour 1 Hz file, against papaparse's raw parse of the same CSV. */
export async function run() {
  const ride = [...enduranceRide(180, 1), ...enduranceRide(170, 2).map((s) => ({ ...s, t: s.t + 7200 }))];
  const csv = toCsv(ride);
  const gpx = toGpx(ride);
  const fit = toFit(ride);
  const raw = () => Papa.parse(csv);
  const curve = (data: string | Uint8Array, name: string) => () =>
    powerCurve(parseActivity(data, name).samples, STANDARD_WINDOWS_S);
  const kb = (x: { length: number }) => `${Math.round(x.length / 1024)} KB`;
  const baselineName = `papaparse over a CSV of the same ${ride.length} samples (${kb(csv)})`;
  return [
    await compare("4 h CSV: parse + power curve", curve(csv, "ride.csv"), raw, {
      baselineName,
      aim: 4,
      runs: 9,
      note: `file ${kb(csv)}`,
    }),
    await compare("4 h GPX: parse + power curve", curve(gpx, "ride.gpx"), raw, {
      baselineName,
      aim: 4,
      runs: 5,
      note: `file ${kb(gpx)}: the same samples in XML, so more bytes to read`,
    }),
    await compare("4 h FIT: parse + power curve", curve(fit, "ride.fit"), raw, {
      baselineName,
      aim: 4,
      runs: 5,
      note: `file ${kb(fit)} binary`,
    }),
  ];
}
