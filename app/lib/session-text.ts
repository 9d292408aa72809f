import type { Block } from "~/lib/training";
import { formatMinutes } from "./duration";

const METRIC_UNIT: Record<string, string> = { power: "% power", heart_rate: "% HR", pace: "% pace" };

export function describeTarget(
  t: { metric: string; lowPct: number; highPct?: number | null } | null | undefined,
): string {
  if (!t) return "easy";
  const range = t.highPct != null && t.highPct !== t.lowPct ? `${t.lowPct}–${t.highPct}` : `${t.lowPct}`;
  return `${range} ${METRIC_UNIT[t.metric] ?? "%"}`;
}

/** A block in words, in % of threshold: "4 × 8 min at 95–99 % power, 4 min easy between". */
export function describeBlock(b: Block): string {
  switch (b.kind) {
    case "repeats":
      return `${b.count} × ${formatMinutes(b.work.durationS)} at ${describeTarget(b.work.target)}${
        b.recovery?.durationS
          ? `, ${formatMinutes(b.recovery.durationS)} ${b.recovery.target ? `at ${describeTarget(b.recovery.target)}` : "easy"} between`
          : ""
      }`;
    case "ramp":
      return `${formatMinutes(b.durationS)} ramp ${b.fromPct}→${b.toPct} ${METRIC_UNIT[b.metric]}`;
    case "open":
      return `${formatMinutes(b.durationS)} open${b.cue ? ` · ${b.cue}` : ""}`;
    default:
      return `${formatMinutes(b.durationS)} at ${describeTarget(b.target)}`;
  }
}
