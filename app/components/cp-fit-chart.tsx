/**
 * The critical-power fit as it was computed: each effort's work (kJ) against its duration, and the straight line
 * work = CP · t + W′ through them, so a person can see whether the efforts lie on it.
 */
export function CpFitChart({
  fit,
}: {
  fit: {
    cpW: number;
    wPrimeJ: number;
    r2: number;
    points: { durationS: number; meanPowerW: number; workJ: number; fittedWorkJ: number }[];
  };
}) {
  const W = 280;
  const H = 150;
  const pad = { l: 36, r: 8, t: 8, b: 24 };
  const maxT = Math.max(...fit.points.map((p) => p.durationS)) * 1.1;
  const maxWork =
    Math.max(...fit.points.map((p) => Math.max(p.workJ, p.fittedWorkJ)), fit.cpW * maxT + fit.wPrimeJ) * 1.05;
  const x = (t: number) => pad.l + (t / maxT) * (W - pad.l - pad.r);
  const y = (j: number) => H - pad.b - (j / maxWork) * (H - pad.t - pad.b);
  const min = (t: number) => `${Math.round(t / 60)}′`;
  return (
    <figure className="flex flex-col gap-1" data-testid="cp-fit">
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="w-full max-w-xs"
        role="img"
        aria-label={`Work against time: line of critical power ${Math.round(fit.cpW)} W, r² ${fit.r2.toFixed(3)}`}
      >
        <line x1={pad.l} y1={H - pad.b} x2={W - pad.r} y2={H - pad.b} stroke="#1B2330" strokeWidth={0.5} />
        <line x1={pad.l} y1={pad.t} x2={pad.l} y2={H - pad.b} stroke="#1B2330" strokeWidth={0.5} />
        <line
          x1={x(0)}
          y1={y(fit.wPrimeJ)}
          x2={x(maxT)}
          y2={y(fit.cpW * maxT + fit.wPrimeJ)}
          stroke="#1F5F5B"
          strokeWidth={1.5}
        />
        {fit.points.map((p) => (
          <g key={p.durationS}>
            <line
              x1={x(p.durationS)}
              y1={y(p.workJ)}
              x2={x(p.durationS)}
              y2={y(p.fittedWorkJ)}
              stroke="#B5523B"
              strokeWidth={1}
            />
            <circle cx={x(p.durationS)} cy={y(p.workJ)} r={3.5} fill="#B5523B" />
            <text x={x(p.durationS)} y={H - pad.b + 12} fontSize={9} textAnchor="middle" fill="#1B2330">
              {min(p.durationS)}
            </text>
          </g>
        ))}
        <text x={pad.l - 4} y={pad.t + 8} fontSize={9} textAnchor="end" fill="#1B2330">
          {Math.round(maxWork / 1000)} kJ
        </text>
        <text x={pad.l - 4} y={H - pad.b} fontSize={9} textAnchor="end" fill="#1B2330">
          0
        </text>
      </svg>
      <figcaption className="num text-xs text-ink-soft">
        Line: critical power {Math.round(fit.cpW)} W (its slope), W′ {(fit.wPrimeJ / 1000).toFixed(1)} kJ (where it
        starts), r² {fit.r2.toFixed(3)}. Dots are your efforts; a long stem means an effort lies off the line.
      </figcaption>
    </figure>
  );
}
