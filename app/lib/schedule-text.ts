import { formatMinutes } from "./duration";
import {
  bandIndexOf,
  bandSetKeyFor,
  bandShade,
  formatTarget,
  type BandSet,
  type BandSetKey,
  type Metric,
  type TargetUnit,
} from "~/lib/training";

/** A scheduled step as loaders send it to the browser. */
export interface StepView {
  position: number;
  blockIndex: number;
  kind: string;
  part: string;
  rep: number | null;
  repCount: number | null;
  durationS: number;
  metric: string | null;
  lowPct: number | null;
  highPct: number | null;
  ramp: boolean;
  lowAbs: number | null;
  highAbs: number | null;
  unit: string | null;
  cue: string | null;
}

const METRIC_WORD: Record<string, string> = { power: "power", heart_rate: "heart rate", pace: "pace" };

/** "237–247 W", or "95–99 % power" while the athlete has no threshold for it yet. */
export function stepTarget(
  s: Pick<StepView, "metric" | "lowPct" | "highPct" | "lowAbs" | "highAbs" | "unit" | "ramp">,
): string {
  if (s.metric === null || s.lowPct === null) return "easy";
  if (s.lowAbs !== null && s.highAbs !== null && s.unit) {
    if (s.ramp) {
      const one = (v: number) => formatTarget({ low: v, high: v, unit: s.unit as TargetUnit });
      return `${one(s.lowAbs)} → ${one(s.highAbs)}`;
    }
    return formatTarget({ low: s.lowAbs, high: s.highAbs, unit: s.unit as TargetUnit });
  }
  const hi = s.highPct ?? s.lowPct;
  const range = s.ramp ? `${s.lowPct} → ${hi}` : hi !== s.lowPct ? `${s.lowPct}–${hi}` : `${s.lowPct}`;
  return `${range} % ${METRIC_WORD[s.metric] ?? ""}`.trim();
}

export interface BlockLine {
  blockIndex: number;
  kind: string;
  text: string;
  needsTest: boolean;
  weight: number;
}

/** Groups steps back into the blocks they came from, each written out in absolute units where known. */
export function blockLines(steps: StepView[]): BlockLine[] {
  const byBlock = new Map<number, StepView[]>();
  for (const s of [...steps].sort((a, b) => a.position - b.position)) {
    const list = byBlock.get(s.blockIndex) ?? [];
    list.push(s);
    byBlock.set(s.blockIndex, list);
  }
  return [...byBlock.entries()].map(([blockIndex, list]) => {
    const first = list[0];
    const needsTest = list.some((s) => s.metric !== null && s.lowAbs === null);
    const weight = list.reduce((w, s) => w + (s.durationS * ((s.lowPct ?? 30) + (s.highPct ?? s.lowPct ?? 30))) / 2, 0);
    if (first.kind === "repeats") {
      const work = list.find((s) => s.part === "work")!;
      const recovery = list.find((s) => s.part === "recovery");
      const count = work.repCount ?? list.filter((s) => s.part === "work").length;
      const text = `${count} × ${formatMinutes(work.durationS)} at ${stepTarget(work)}${recovery ? `, ${formatMinutes(recovery.durationS)} ${recovery.metric ? `at ${stepTarget(recovery)}` : "easy"} between` : ""}`;
      return { blockIndex, kind: first.kind, text, needsTest, weight };
    }
    const label =
      first.kind === "warmup"
        ? "Warm-up"
        : first.kind === "cooldown"
          ? "Cool-down"
          : first.kind === "ramp"
            ? "Ramp"
            : first.kind === "open"
              ? "Open"
              : "Steady";
    const target = first.kind === "open" ? first.cue || "as you feel" : stepTarget(first);
    return {
      blockIndex,
      kind: first.kind,
      text: `${label} ${formatMinutes(first.durationS)} ${first.kind === "open" ? "· " : "at "}${target}`,
      needsTest,
      weight,
    };
  });
}

/** The session's key set in one phrase: its heaviest block that is not warm-up or cool-down. */
export function keyTarget(steps: StepView[]): string {
  const lines = blockLines(steps);
  const main = lines.filter((l) => l.kind !== "warmup" && l.kind !== "cooldown");
  const pick = (main.length ? main : lines).reduce<BlockLine | null>(
    (best, l) => (!best || l.weight > best.weight ? l : best),
    null,
  );
  return pick?.text ?? "";
}

export interface BlockBand {
  blockIndex: number;
  name: string;
  shade: string;
  aboveThreshold: boolean;
}

/**
 * The intensity band of each targeted block, at the middle of its main (not recovery) target, in the band set of the
 * block's sport and metric. Open blocks have no band.
 */
export function blockBands(steps: StepView[], sport: string, sets: Record<BandSetKey, BandSet>): BlockBand[] {
  const out: BlockBand[] = [];
  const seen = new Set<number>();
  for (const s of [...steps].sort((a, b) => a.position - b.position)) {
    if (seen.has(s.blockIndex) || s.part === "recovery") continue;
    seen.add(s.blockIndex);
    if (s.metric === null || s.lowPct === null) continue;
    const set = sets[bandSetKeyFor(sport, s.metric as Metric)];
    const mid = (s.lowPct + (s.highPct ?? s.lowPct)) / 2;
    const i = bandIndexOf(mid, set.bands);
    out.push({
      blockIndex: s.blockIndex,
      name: set.bands[i].name,
      shade: bandShade(i, set.bands.length),
      aboveThreshold: set.bands[i].fromPct >= 100,
    });
  }
  return out;
}
