import { describe, expect, it } from "vitest";
import {
  bandLoad,
  bandSetKeyFor,
  defaultBandSet,
  lapTable,
  lapsFromSplits,
  minutesPerBand,
  parseActivity,
  valueHistogram,
  wPrimeBalance,
  type Sample,
} from "~/lib/training";
import { toCsv, toFit, toGpx, type RideSample } from "../../db/demo/rides";

const series = (parts: [number, number, number?][]): Sample[] => {
  const out: Sample[] = [];
  for (const [n, w, hr] of parts) for (let i = 0; i < n; i++) out.push({ t: out.length, power: w, hr: hr ?? null });
  return out;
};

describe("lap table", () => {
  it("time, mean and peak power, mean heart rate and its rise (last 30 s − first 30 s)", () => {
    const s: Sample[] = [];
    // Lap 1: 300 s at 200 W, heart rate climbing 120 → 149 one beat every 10 s. Lap 2: 120 s at 300 W with a 600 W second.
    for (let t = 0; t < 300; t++) s.push({ t, power: 200, hr: 120 + Math.floor(t / 10) });
    for (let t = 300; t < 420; t++) s.push({ t, power: t === 350 ? 600 : 300, hr: 150 });
    const rows = lapTable(s, lapsFromSplits([300], s.length));
    expect(rows[0]).toMatchObject({ lap: 1, startS: 0, durationS: 300, meanPowerW: 200, peakPowerW: 200 });
    // mean of 120 + floor(t/10) over 0..299 = 120 + 14.5; first 30 s mean 121, last 30 s mean 148 → rise 27
    expect(rows[0].meanHr).toBeCloseTo(134.5, 9);
    expect(rows[0].hrRiseBpm).toBeCloseTo(27, 9);
    // Lap 2 is under 3 minutes: its edges are a sixth of it (20 s); flat heart rate → rise 0.
    expect(rows[1]).toMatchObject({ lap: 2, durationS: 120, peakPowerW: 600, hrRiseBpm: 0 });
    expect(rows[1].meanPowerW).toBeCloseTo((119 * 300 + 600) / 120, 9);
  });
});

describe("W′ balance, integral form (Skiba et al. 2012, MSSE 44:1526)", () => {
  it("matches a worked example: CP 250 W, W′ 20 kJ, 10 min at 150 W, 60 s at 350 W, 5 min at 150 W", () => {
    const s = series([
      [600, 150],
      [60, 350],
      [300, 150],
    ]);
    const r = wPrimeBalance(s, 250, 20_000);
    // DCP = 250 − 150 (mean of the seconds below CP) = 100 W; τ = 546·e^(−1) + 316 = 516.86 s.
    const tau = 546 * Math.exp(-1) + 316;
    expect(r.dcpW).toBe(100);
    expect(r.tauS).toBeCloseTo(tau, 9);
    // Worked by hand: after the 60 s effort the expended sum is 100 J · Σ_{k=0}^{59} e^(−k/τ) (a geometric series).
    const q = Math.exp(-1 / tau);
    const spentAtEnd = (100 * (1 - q ** 60)) / (1 - q);
    expect(r.balanceJ[659]).toBeCloseTo(20_000 - spentAtEnd, 6);
    expect(20_000 - spentAtEnd).toBeCloseTo(14_330, -1); // ≈ 14.33 kJ left
    // …and 300 s of recovery later it has decayed by e^(−300/τ).
    expect(r.balanceJ[959]).toBeCloseTo(20_000 - spentAtEnd * q ** 300, 6);
    expect(r.minJ).toBeCloseTo(r.balanceJ[659], 9);
  });

  it("agrees with the direct double sum of the published formula on an irregular ride", () => {
    const s: Sample[] = Array.from({ length: 900 }, (_, t) => ({
      t,
      power: 180 + 160 * Math.sin(t / 37) + ((t * 13) % 40),
    }));
    const cp = 260;
    const wp = 18_000;
    const r = wPrimeBalance(s, cp, wp);
    const below = s.filter((x) => x.power! < cp);
    const tau = 546 * Math.exp(-0.01 * (cp - below.reduce((a, x) => a + x.power!, 0) / below.length)) + 316;
    for (const t of [0, 120, 455, 899]) {
      let sum = 0;
      for (let u = 0; u <= t; u++) sum += Math.max(0, s[u].power! - cp) * Math.exp(-(t - u) / tau);
      expect(r.balanceJ[t]).toBeCloseTo(wp - sum, 6);
    }
  });
});

describe("band load (minutes per power band × the band's place, 1, 2, 3 …; Edwards' weighting idea on our bands)", () => {
  it("weights each band's minutes by its place from the bottom", () => {
    const set = defaultBandSet(bandSetKeyFor("bike", "power"));
    const s = series([
      [1200, 150],
      [600, 250],
      [300, 300],
    ]);
    const hist = valueHistogram(s.map((x) => x.power));
    const r = bandLoad(hist, 262, set);
    const minutes = minutesPerBand(hist, 262, set);
    expect(r.weights).toEqual(set.bands.map((_, i) => i + 1));
    expect(r.load).toBeCloseTo(
      minutes.reduce((a, m, i) => a + m * (i + 1), 0),
      9,
    );
    expect(r.minutes.reduce((a, m) => a + m, 0)).toBeCloseTo(35, 9);
  });
});

describe("laps in files", () => {
  const ride: RideSample[] = Array.from({ length: 900 }, (_, t) => ({
    t,
    power: t < 300 ? 150 : t < 600 ? 250 : 120,
    hr: 130,
    cadence: 90,
    speed: 8,
  }));
  it("FIT lap messages", () => {
    expect(parseActivity(toFit(ride, undefined, [0, 300, 600]), "r.fit").meta.laps).toEqual([
      { startS: 0, endS: 300 },
      { startS: 300, endS: 600 },
      { startS: 600, endS: 900 },
    ]);
    expect(parseActivity(toFit(ride), "r.fit").meta.laps).toBeUndefined();
  });
  it("a CSV lap column", () => {
    const csv = toCsv(ride).split("\n");
    const withLap = [
      csv[0] + ",lap",
      ...csv
        .slice(1)
        .filter(Boolean)
        .map((line, i) => `${line},${i < 450 ? 1 : 2}`),
    ].join("\n");
    expect(parseActivity(withLap, "r.csv").meta.laps).toEqual([
      { startS: 0, endS: 450 },
      { startS: 450, endS: 900 },
    ]);
  });
  it("GPX track segments", () => {
    const gpx = toGpx(ride);
    // Split the one segment in two before the point at second 600.
    const at = gpx.lastIndexOf("<trkpt", gpx.indexOf("T08:10:00.000Z"));
    const two = gpx.slice(0, at) + "</trkseg><trkseg>" + gpx.slice(at);
    expect(parseActivity(two, "r.gpx").meta.laps).toEqual([
      { startS: 0, endS: 600 },
      { startS: 600, endS: 900 },
    ]);
  });
});
