import type { Sample } from "./activity";
import { minutesPerBand, type Band, type Metric } from "./bands";
import { requirePositive, TrainingInputError } from "./errors";

type Series = readonly Sample[];

/** A lap as seconds of the 1 Hz series: [startS, endS). */
export interface LapMark {
  startS: number;
  endS: number;
}

export interface LapRow {
  lap: number;
  startS: number;
  durationS: number;
  meanPowerW: number | null;
  peakPowerW: number | null;
  meanHr: number | null;
  /** Mean heart rate of the lap's last 30 s minus its first 30 s (a sixth of the lap each when shorter than 3 min). */
  hrRiseBpm: number | null;
}

/** Checks and tidies laps: whole seconds inside the file, in order, not overlapping, each at least 1 s. */
export function normaliseLaps(laps: readonly LapMark[], length: number): LapMark[] {
  const out: LapMark[] = [];
  for (const l of [...laps].sort((a, b) => a.startS - b.startS)) {
    const startS = Math.max(0, Math.round(l.startS));
    const endS = Math.min(length, Math.round(l.endS));
    if (!(endS > startS)) continue;
    if (out.length && startS < out[out.length - 1].endS)
      throw new TrainingInputError("out_of_range", "Laps must not overlap.");
    out.push({ startS, endS });
  }
  return out;
}

/** Laps from the points where a user split the trace (seconds): from the start to the first split, and so on to the end. */
export function lapsFromSplits(splitsS: readonly number[], length: number): LapMark[] {
  const cuts = [...new Set(splitsS.map((s) => Math.round(s)).filter((s) => s > 0 && s < length))].sort((a, b) => a - b);
  const edges = [0, ...cuts, length];
  return edges.slice(1).map((end, i) => ({ startS: edges[i], endS: end }));
}

/**
 * The lap table: time, mean and peak (1 s) power, mean heart rate and its rise through the lap. One pass over each
 * lap's samples, so a whole file costs O(n).
 */
export function lapTable(series: Series, laps: readonly LapMark[]): LapRow[] {
  const marks = normaliseLaps(laps, series.length);
  return marks.map((l, i) => {
    let pSum = 0;
    let pN = 0;
    let peak = -1;
    let hSum = 0;
    let hN = 0;
    const d = l.endS - l.startS;
    const edge = d >= 180 ? 30 : Math.max(1, Math.floor(d / 6));
    let firstSum = 0;
    let firstN = 0;
    let lastSum = 0;
    let lastN = 0;
    for (let t = l.startS; t < l.endS; t++) {
      const s = series[t];
      if (typeof s.power === "number") {
        pSum += s.power;
        pN++;
        if (s.power > peak) peak = s.power;
      }
      if (typeof s.hr === "number") {
        hSum += s.hr;
        hN++;
        if (t < l.startS + edge) {
          firstSum += s.hr;
          firstN++;
        }
        if (t >= l.endS - edge) {
          lastSum += s.hr;
          lastN++;
        }
      }
    }
    return {
      lap: i + 1,
      startS: l.startS,
      durationS: d,
      meanPowerW: pN ? pSum / pN : null,
      peakPowerW: pN ? peak : null,
      meanHr: hN ? hSum / hN : null,
      hrRiseBpm: firstN && lastN ? lastSum / lastN - firstSum / firstN : null,
    };
  });
}

export interface WPrimeBalance {
  /** W′ balance in joules for each second. */
  balanceJ: Float64Array;
  /** Recovery time constant used (s) and the DCP it came from (W). */
  tauS: number;
  dcpW: number;
  minJ: number;
}

/**
 * W′ balance through a ride: the integral form of Skiba PF, Chidnok W, Vanhatalo A, Jones AM (2012), Modeling the
 * expenditure and reconstitution of work capacity above critical power, Med Sci Sports Exerc 44(8):1526–1532:
 *   W′bal(t) = W′ − Σ_{u ≤ t} W′exp(u) · e^(−(t − u)/τ),  W′exp(u) = max(0, P(u) − CP) · 1 s,
 *   τ = 546 · e^(−0.01 · DCP) + 316,  DCP = CP − mean power of the seconds below CP (the whole ride's).
 * The sum is kept as a running value S(t) = S(t − 1) · e^(−1/τ) + W′exp(t), which is the same sum in O(n).
 */
export function wPrimeBalance(series: Series, cpW: number, wPrimeJ: number): WPrimeBalance {
  const cp = requirePositive(cpW, "Critical power (W)", 2500);
  const wp = requirePositive(wPrimeJ, "W′ (J)", 200_000);
  if (!series.some((s) => typeof s.power === "number"))
    throw new TrainingInputError("no_power", "W′ balance needs power readings.");
  let below = 0;
  let belowN = 0;
  for (const s of series) {
    const p = s.power ?? 0;
    if (p < cp) {
      below += p;
      belowN++;
    }
  }
  const dcpW = belowN ? cp - below / belowN : cp;
  const tauS = 546 * Math.exp(-0.01 * dcpW) + 316;
  const decay = Math.exp(-1 / tauS);
  const balanceJ = new Float64Array(series.length);
  let spent = 0;
  let minJ = wp;
  for (let t = 0; t < series.length; t++) {
    const p = series[t].power ?? 0;
    spent = spent * decay + (p > cp ? p - cp : 0);
    const bal = wp - spent;
    balanceJ[t] = bal;
    if (bal < minJ) minJ = bal;
  }
  return { balanceJ, tauS, dcpW, minJ };
}

/**
 * Band load: Pacewright's power-based session load for rides without heart rate or an effort score. Minutes in each
 * power band × the band's weight, the weight being the band's place from the bottom (1, 2, 3 …). The idea is
 * Edwards' zone weighting (Edwards S 1993, The Heart Rate Monitor Book: minutes per zone × 1…5) applied to our
 * own power bands, whatever their number; name and weights are ours.
 */
export function bandLoad(
  powerHistogram: Record<string, number>,
  thresholdW: number,
  set: { metric: Metric; bands: readonly Band[] },
) {
  if (set.metric !== "power") throw new TrainingInputError("out_of_range", "Band load is computed on power bands.");
  const minutes = minutesPerBand(powerHistogram, thresholdW, set);
  const weights = minutes.map((_, i) => i + 1);
  const load = minutes.reduce((a, m, i) => a + m * weights[i], 0);
  return { minutes, weights, load };
}
