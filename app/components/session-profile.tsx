import type { ProfileStep } from "~/lib/board";
import { useBandSet } from "~/components/bands-context";
import { shadeOfPct, type Band } from "~/lib/training";

/**
 * A session's step profile: width is time, height is % of threshold, colour is the shade of the step's intensity
 * band on the single-hue ramp (the viewer's band set; power unless `bands` says otherwise), and work above threshold
 * gets a brick edge. Untargeted steps are drawn as a low hatched band.
 */
export function SessionProfile({
  steps,
  height = 40,
  className = "",
  label,
  maxPct = 130,
  bands,
}: {
  steps: ProfileStep[];
  height?: number;
  className?: string;
  label?: string;
  maxPct?: number;
  bands?: readonly Band[];
}) {
  return (
    <svg
      viewBox={`0 0 ${PROFILE_WIDTH} ${height}`}
      preserveAspectRatio="none"
      className={`block w-full ${className}`}
      role="img"
      aria-label={label ?? "Session profile"}
      style={{ height }}
    >
      <ProfileMarks steps={steps} height={height} maxPct={maxPct} bands={bands} />
    </svg>
  );
}

const PROFILE_WIDTH = 300;

/** The marks of a profile in a 300 × `height` box, without the box: the board draws each distinct one once as a symbol. */
export function ProfileMarks({
  steps,
  height,
  maxPct = 130,
  bands,
}: {
  steps: ProfileStep[];
  height: number;
  maxPct?: number;
  bands?: readonly Band[];
}) {
  const powerSet = useBandSet("bike:power");
  const levelColour = (pct: number) => shadeOfPct(pct, bands ?? powerSet.bands);
  const total = steps.reduce((m, s) => Math.max(m, s.s + s.d), 0) || 1;
  const W = PROFILE_WIDTH;
  const y = (pct: number) => height - (Math.min(pct, maxPct) / maxPct) * (height - 2);
  return (
    <>
      <line
        x1={0}
        x2={W}
        y1={y(100)}
        y2={y(100)}
        stroke="var(--color-brick)"
        strokeDasharray="3 3"
        strokeWidth={0.75}
        vectorEffect="non-scaling-stroke"
      />
      {steps.map((st, i) => {
        const x = (st.s / total) * W;
        const w = Math.max(0.5, (st.d / total) * W);
        if (st.lo === null || st.hi === null) {
          return (
            <rect
              key={i}
              x={x}
              y={y(30)}
              width={w}
              height={height - y(30)}
              fill="var(--color-paper-deep)"
              stroke="var(--color-line)"
              strokeWidth={0.5}
              vectorEffect="non-scaling-stroke"
            />
          );
        }
        if (st.ramp) {
          const mid = (st.lo + st.hi) / 2;
          return (
            <polygon
              key={i}
              points={`${x},${height} ${x},${y(st.lo)} ${x + w},${y(st.hi)} ${x + w},${height}`}
              fill={levelColour(mid)}
              stroke={Math.max(st.lo, st.hi) > 100 ? "var(--color-brick)" : "none"}
              strokeWidth={1}
              vectorEffect="non-scaling-stroke"
            />
          );
        }
        const mid = (st.lo + st.hi) / 2;
        return (
          <rect
            key={i}
            x={x}
            y={y(mid)}
            width={Math.max(0.5, w - 0.4)}
            height={height - y(mid)}
            fill={levelColour(mid)}
            stroke={mid > 100 ? "var(--color-brick)" : "none"}
            strokeWidth={1}
            vectorEffect="non-scaling-stroke"
          />
        );
      })}
    </>
  );
}
