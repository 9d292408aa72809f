import { PHASE_LABEL } from "~/lib/plans";

export interface RibbonWeek {
  idx: number;
  phase: string;
  recovery: boolean;
  test: boolean;
  hours?: number;
}

/** Weeks as a strip of earth-toned cells: phase colour, a lighter cell for recovery weeks, a dot for test weeks. */
export function PhaseRibbon({ weeks, className = "" }: { weeks: RibbonWeek[]; className?: string }) {
  const phases = [...new Set(weeks.map((w) => w.phase))];
  return (
    <div className={className}>
      <ol className="flex h-7 w-full overflow-hidden rounded-md border border-line" aria-label="Phases by week">
        {weeks.map((w) => (
          <li
            key={w.idx}
            title={`Week ${w.idx}: ${PHASE_LABEL[w.phase as keyof typeof PHASE_LABEL] ?? w.phase}${w.recovery ? ", recovery" : ""}${w.test ? ", field test" : ""}`}
            className="relative flex-1 border-r border-paper last:border-r-0"
            style={{ background: `var(--color-phase-${w.phase})`, opacity: w.recovery ? 0.45 : 1 }}
          >
            <span className="sr-only">
              Week {w.idx}: {w.phase}
              {w.recovery ? ", recovery week" : ""}
              {w.test ? ", test week" : ""}
            </span>
            {w.test && (
              <span
                aria-hidden="true"
                className="absolute top-1 left-1/2 h-1.5 w-1.5 -translate-x-1/2 rounded-full bg-paper ring-1 ring-ink"
              />
            )}
          </li>
        ))}
      </ol>
      <ul className="mt-2 flex flex-wrap gap-3 text-xs text-ink-soft" aria-hidden="true">
        {phases.map((p) => (
          <li key={p} className="flex items-center gap-1">
            <span className="h-2.5 w-2.5 rounded-sm" style={{ background: `var(--color-phase-${p})` }} />
            {PHASE_LABEL[p as keyof typeof PHASE_LABEL] ?? p}
          </li>
        ))}
        <li className="flex items-center gap-1">
          <span className="h-2 w-2 rounded-full bg-paper ring-1 ring-ink" /> test week
        </li>
        <li className="flex items-center gap-1">
          <span className="h-2.5 w-2.5 rounded-sm bg-phase-base opacity-45" /> recovery week
        </li>
      </ul>
    </div>
  );
}
