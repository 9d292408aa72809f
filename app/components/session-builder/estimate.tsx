import { useMemo } from "react";
import { useBandSets } from "~/components/bands-context";
import { SessionProfile } from "~/components/session-profile";
import { formatClock } from "~/lib/duration";
import {
  bandAboveThreshold,
  bandSetKeyFor,
  bandShade,
  estimateSession,
  expandBlocks,
  type Block,
  type Metric,
} from "~/lib/training";

/** The metric most of a session's targeted blocks use: its band set shades the estimate. */
function mainMetric(blocks: Block[]): Metric {
  const count = new Map<Metric, number>();
  for (const b of blocks) {
    const m =
      b.kind === "open"
        ? null
        : b.kind === "ramp"
          ? b.metric
          : b.kind === "repeats"
            ? b.work.target.metric
            : b.target.metric;
    if (m) count.set(m, (count.get(m) ?? 0) + 1);
  }
  return [...count.entries()].sort((a, b) => b[1] - a[1])[0]?.[0] ?? "power";
}

/**
 * The drawing and the figures of the session as it stands: duration, work at a reference threshold, planned load and
 * minutes per band of the viewer's band set. They wait while a field is half-typed (`valid` false), so nothing
 * reads "NaN min" and the drawing never gets an impossible size.
 */
export function SessionEstimate({
  blocks,
  sport,
  valid,
  reference,
  onReference,
}: {
  blocks: Block[];
  sport: string;
  valid: boolean;
  reference: number;
  onReference: (w: number) => void;
}) {
  const bandSets = useBandSets();
  const bandSet = bandSets[bandSetKeyFor(sport, mainMetric(blocks))];
  const estimate = useMemo(() => {
    if (!valid) return null;
    try {
      return estimateSession(blocks, { power: reference > 0 ? reference : undefined }, bandSet.bands);
    } catch {
      return null;
    }
  }, [blocks, reference, bandSet, valid]);
  const profile = useMemo(() => {
    if (!valid) return [];
    try {
      return expandBlocks(blocks).map((s) => ({
        s: s.startS,
        d: s.durationS,
        lo: s.lowPct,
        hi: s.highPct,
        ramp: s.ramp,
      }));
    } catch {
      return [];
    }
  }, [blocks, valid]);

  return (
    <div className="rounded-xl border border-line bg-white p-4">
      <h2 className="font-semibold">Preview</h2>
      {valid ? (
        <SessionProfile
          steps={profile}
          height={80}
          className="mt-3 rounded bg-paper/60"
          label="Step profile of this session"
        />
      ) : (
        <p className="mt-3 flex h-20 items-center justify-center rounded bg-paper/60 px-3 text-center text-sm text-ink-soft">
          The profile returns once the highlighted fields are fixed.
        </p>
      )}
      <p className="mt-1 text-xs text-ink-soft">Height is % of threshold; the dashed line is threshold.</p>
      <label className="mt-4 flex items-center justify-between gap-2 text-sm">
        <span>Reference threshold power</span>
        <span className="flex items-center gap-1">
          <input
            type="number"
            min={50}
            max={600}
            value={reference || ""}
            onChange={(e) => onReference(Number(e.target.value))}
            className="num w-20 rounded-lg border border-line px-2 py-1 text-right"
            aria-label="Reference threshold power in watts"
          />
          W
        </span>
      </label>
      {estimate ? (
        <dl className="num mt-4 grid grid-cols-2 gap-x-4 gap-y-2 text-sm" data-testid="estimates">
          <dt className="text-ink-soft">Duration</dt>
          <dd className="text-right font-medium">{formatClock(estimate.durationS)}</dd>
          <dt className="text-ink-soft">Work</dt>
          <dd className="text-right font-medium">
            {estimate.workKj === null ? "—" : `${Math.round(estimate.workKj)} kJ`}
          </dd>
          <dt className="text-ink-soft" title="Effort score (0–10) times minutes, as planned">
            Planned effort load
          </dt>
          <dd className="text-right font-medium">{Math.round(estimate.plannedEffortLoad)} points</dd>
        </dl>
      ) : (
        <p className="mt-4 text-sm text-brick">Fix the highlighted fields to see estimates.</p>
      )}
      {estimate && (
        <div className="mt-4">
          <h3 className="text-sm font-medium">Minutes per band</h3>
          <ul className="mt-2 flex flex-col gap-1 text-xs" data-testid="minutes-per-band">
            {estimate.minutesPerBand.map((m, i) => (
              <li key={i} className="grid grid-cols-[6.5rem_1fr_2.5rem] items-center gap-2">
                <span>{bandSet.bands[i]?.name}</span>
                <span
                  className="h-2 rounded"
                  style={{
                    width: `${(m / Math.max(1, estimate.durationS / 60)) * 100}%`,
                    background: bandShade(i, bandSet.bands.length),
                    boxShadow:
                      bandSet.bands[i] && bandAboveThreshold(bandSet.bands[i])
                        ? "inset 0 0 0 1px var(--color-brick)"
                        : undefined,
                  }}
                />
                <span className="num text-right">{Math.round(m)}</span>
              </li>
            ))}
            {estimate.openMinutes > 0 && (
              <li className="grid grid-cols-[6.5rem_1fr_2.5rem] gap-2 text-ink-soft">
                <span>Open</span>
                <span />
                <span className="num text-right">{Math.round(estimate.openMinutes)}</span>
              </li>
            )}
          </ul>
        </div>
      )}
    </div>
  );
}
