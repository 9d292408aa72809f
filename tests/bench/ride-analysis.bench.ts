import { lapsFromSplits, lapTable, powerCurve, STANDARD_WINDOWS_S, wPrimeBalance } from "~/lib/training";
import { enduranceRide } from "../../db/demo/rides";
import { compare } from "./lib";

/** Lap table (24 laps of 10 min) and W′ balance of a 4-hour 1 Hz ride, against the power curve alone of the same ride. */
export async function run() {
  const ride = [...enduranceRide(180, 1), ...enduranceRide(170, 2).map((s) => ({ ...s, t: s.t + 7200 }))];
  const samples = ride.map((s) => ({ t: s.t, power: s.power, hr: s.hr, cadence: s.cadence, speed: s.speed }));
  const laps = lapsFromSplits(
    Array.from({ length: 23 }, (_, i) => (i + 1) * 600),
    samples.length,
  );
  const analysis = () => {
    lapTable(samples, laps);
    wPrimeBalance(samples, 250, 20_000);
  };
  const curve = () => powerCurve(samples, STANDARD_WINDOWS_S);
  return [
    await compare("4 h ride: lap table + W′ balance", analysis, curve, {
      baselineName: `power curve alone (1 s to 60 min) of the same ${samples.length} samples`,
      aim: 2,
      runs: 9,
    }),
  ];
}
