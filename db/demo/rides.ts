import { FitWriter } from "@markw65/fit-file-writer";

/**
 * Invented, deterministic ride recordings for the demo and the tests: a ramp test, a 20-minute test and a two-hour
 * endurance ride. Numbers are made up; a seeded random walk keeps them lifelike and the same on every run.
 */
export interface RideSample {
  t: number;
  power: number;
  hr: number;
  cadence: number;
  speed: number;
}

function rng(seed: number) {
  let s = seed >>> 0;
  return () => {
    s = (s * 1664525 + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/** Heart rate follows power with a lag, as it does on a bike (first-order response, ~30 s). */
function withHeart(
  powers: number[],
  opts: { restHr: number; maxHr: number; thresholdW: number; seed: number },
): RideSample[] {
  const rand = rng(opts.seed);
  let hr = opts.restHr + 30;
  return powers.map((p, t) => {
    const target =
      opts.restHr + 20 + ((opts.maxHr - opts.restHr - 20) * Math.min(1.15, p / opts.thresholdW)) / 1.15 + t / 900;
    hr += (target - hr) / 30;
    const cadence = p > 20 ? 85 + Math.round((rand() - 0.5) * 6) : 0;
    return {
      t,
      power: Math.max(0, Math.round(p)),
      hr: Math.round(Math.min(opts.maxHr, hr)),
      cadence,
      speed: p > 0 ? Math.round((6 + p / 40 + rand()) * 100) / 100 : 0,
    };
  });
}

function steady(n: number, watts: number, rand: () => number, wobble = 8): number[] {
  return Array.from({ length: n }, () => watts + (rand() - 0.5) * 2 * wobble);
}

/** A 20-minute test at a mean of `meanW` inside a 1-hour ride (warm-up, openers, test, cool-down). */
export function twentyMinuteTestRide(meanW = 290, seed = 20): RideSample[] {
  const rand = rng(seed);
  const power = [
    ...steady(900, 150, rand),
    ...steady(60, 300, rand),
    ...steady(120, 120, rand),
    ...steady(60, 310, rand),
    ...steady(300, 130, rand),
  ];
  // The test: paced evenly, with zero-mean noise so its mean is exactly meanW.
  const test = steady(1200, meanW, rand, 12);
  const drift = test.reduce((s, p) => s + p, 0) / test.length - meanW;
  power.push(...test.map((p) => p - drift));
  power.push(...steady(960, 110, rand));
  return withHeart(power, { restHr: 48, maxHr: 188, thresholdW: meanW * 0.95, seed });
}

/** A ramp test: 10 minutes easy, then +20 W every minute from 100 W until the rider stops. */
export function rampTestRide(peakStepW = 380, seed = 7): RideSample[] {
  const rand = rng(seed);
  const power = steady(600, 110, rand, 6);
  for (let w = 100; w <= peakStepW; w += 20) power.push(...steady(60, w, rand, 4));
  power.push(...steady(600, 90, rand, 6));
  return withHeart(power, { restHr: 48, maxHr: 188, thresholdW: 260, seed });
}

/** Two hours of endurance riding around `baseW`, with short rises. */
export function enduranceRide(baseW = 180, seed = 120): RideSample[] {
  const rand = rng(seed);
  const power: number[] = [];
  for (let t = 0; t < 7200; t++) {
    const hill = Math.sin(t / 420) > 0.85 ? 70 : 0;
    power.push(baseW + hill + (rand() - 0.5) * 40);
  }
  return withHeart(power, { restHr: 48, maxHr: 188, thresholdW: 275, seed });
}

export function toCsv(samples: readonly RideSample[]): string {
  return (
    [
      "time,power,heart_rate,cadence,speed",
      ...samples.map((s) => `${s.t},${s.power},${s.hr},${s.cadence},${s.speed}`),
    ].join("\n") + "\n"
  );
}

/** GPX 1.1 with the common track-point extension for heart rate and cadence, and a power element. */
export function toGpx(samples: readonly RideSample[], start = new Date("2026-11-14T08:00:00Z")): string {
  let lat = 40.4168;
  const lon = -3.7038;
  const points = samples.map((s) => {
    lat += s.speed / 111_000;
    const time = new Date(start.getTime() + s.t * 1000).toISOString();
    return `      <trkpt lat="${lat.toFixed(7)}" lon="${lon.toFixed(7)}"><time>${time}</time><extensions><power>${s.power}</power><gpxtpx:TrackPointExtension><gpxtpx:hr>${s.hr}</gpxtpx:hr><gpxtpx:cad>${s.cadence}</gpxtpx:cad></gpxtpx:TrackPointExtension></extensions></trkpt>`;
  });
  return `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="Pacewright demo" xmlns="http://www.topografix.com/GPX/1/1" xmlns:gpxtpx="http://www.garmin.com/xmlschemas/TrackPointExtension/v1">
  <trk>
    <name>Demo ride</name>
    <trkseg>
${points.join("\n")}
    </trkseg>
  </trk>
</gpx>
`;
}

/**
 * A FIT activity file written with a general-purpose FIT writer (file id, records, laps, session, activity).
 * `lapStartsS` (seconds from the start, first 0) writes one lap message per lap; by default the ride is one lap.
 */
export function toFit(
  samples: readonly RideSample[],
  start = new Date("2026-11-14T08:00:00Z"),
  lapStartsS: readonly number[] = [0],
): Uint8Array {
  const w = new FitWriter();
  const t0 = w.time(start);
  w.writeMessage(
    "file_id",
    { type: "activity", manufacturer: "development", product: 0, serial_number: 1234, time_created: t0 },
    null,
    true,
  );
  let distance = 0;
  samples.forEach((s, i) => {
    distance += s.speed;
    w.writeMessage(
      "record",
      { timestamp: t0 + s.t, power: s.power, heart_rate: s.hr, cadence: s.cadence, speed: s.speed, distance },
      null,
      i === samples.length - 1,
    );
  });
  const end = t0 + (samples.at(-1)?.t ?? 0);
  const elapsed = samples.length;
  lapStartsS.forEach((from, i) => {
    const to = lapStartsS[i + 1] ?? elapsed;
    w.writeMessage(
      "lap",
      { timestamp: t0 + to, start_time: t0 + from, total_elapsed_time: to - from, total_timer_time: to - from },
      null,
      i === lapStartsS.length - 1,
    );
  });
  w.writeMessage(
    "session",
    {
      timestamp: end,
      start_time: t0,
      total_elapsed_time: elapsed,
      total_timer_time: elapsed,
      sport: "cycling",
      num_laps: lapStartsS.length,
      first_lap_index: 0,
    },
    null,
    true,
  );
  w.writeMessage(
    "activity",
    { timestamp: end, total_timer_time: elapsed, num_sessions: 1, type: "manual" },
    null,
    true,
  );
  const view = w.finish();
  return new Uint8Array(view.buffer.slice(view.byteOffset, view.byteOffset + view.byteLength));
}
