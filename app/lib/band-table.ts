import { bandRows, formatTarget, type BandRow, type BandSet, type Metric, type TargetUnit } from "~/lib/training";

/** A threshold the way athletes read it: "262 W", "168 bpm", "4:07 /km". */
export function formatThreshold(value: number, unit: string) {
  const v = Math.round(value);
  return formatTarget({ low: v, high: v, unit: unit as TargetUnit });
}

export interface BandTableData {
  key: string;
  sport: string;
  metric: Metric;
  unit: string;
  threshold: number;
  /** "Power bands (cycling)" and the like. */
  title: string;
  /** True when the coach has not edited this set. */
  isDefault: boolean;
  rows: BandRow[];
}

const METRIC_WORD: Record<Metric, string> = { power: "Power", heart_rate: "Heart-rate", pace: "Pace" };
const SPORT_WORD: Record<string, string> = { bike: "cycling", run: "running", swim: "swimming" };

export function bandSetTitle(sport: string, metric: Metric) {
  return `${METRIC_WORD[metric]} bands (${SPORT_WORD[sport] ?? sport})`;
}

/** The bands of one threshold for display (null where no band set applies). */
export function bandTable(
  t: { sport: string; metric: string; value: number; unit: string },
  set: BandSet,
): BandTableData | null {
  const metric = t.metric as Metric;
  return {
    key: `${t.sport}:${t.metric}`,
    sport: t.sport,
    metric,
    unit: t.unit,
    threshold: t.value,
    title: bandSetTitle(t.sport, metric),
    isDefault: set.isDefault,
    rows: bandRows({ metric, bands: set.bands }, t.value, (v) => formatThreshold(v, t.unit)),
  };
}

/** The page's name for each kind of threshold, keyed `sport:metric`. */
export const THRESHOLD_LABEL: Record<string, string> = {
  "bike:power": "Bike power",
  "bike:heart_rate": "Bike heart rate",
  "run:heart_rate": "Run heart rate",
  "run:pace": "Run pace",
  "swim:pace": "Swim pace",
};
