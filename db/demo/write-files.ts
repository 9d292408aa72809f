import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { enduranceRide, rampTestRide, toCsv, toFit, toGpx, twentyMinuteTestRide } from "./rides";

/** Regenerates the invented demo ride files in db/demo/files (deterministic; run after changing rides.ts). */
const dir = path.join(path.dirname(fileURLToPath(import.meta.url)), "files");
fs.mkdirSync(dir, { recursive: true });
const ftpRide = twentyMinuteTestRide(290);
const files: [string, string | Uint8Array][] = [
  ["ramp-test.csv", toCsv(rampTestRide(380))],
  ["twenty-minute-test.csv", toCsv(ftpRide)],
  ["twenty-minute-test.fit", toFit(ftpRide)],
  ["twenty-minute-test.gpx", toGpx(ftpRide)],
  ["endurance-2h.csv", toCsv(enduranceRide())],
];
for (const [name, data] of files) {
  fs.writeFileSync(path.join(dir, name), data);
  console.log(`${name}: ${fs.statSync(path.join(dir, name)).size} bytes`);
}
