import { Area, ComposedChart, Line, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";

type Point = { t: number; power: number | null; hr: number | null; wbalKj: number | null };

/**
 * Power and heart rate over the ride with lap boundaries; a click on the trace adds a lap split there. W′ balance,
 * when known, is drawn in its own band underneath on the same time axis.
 */
export function RideChart({
  trace,
  splitsS,
  onSplit,
  wPrimeKj,
}: {
  trace: Point[];
  splitsS: number[];
  onSplit?: (s: number) => void;
  wPrimeKj: number | null;
}) {
  const data = trace.map((p) => ({
    min: Math.round((p.t / 60) * 100) / 100,
    power: p.power,
    hr: p.hr,
    wbal: p.wbalKj,
  }));
  const last = data.at(-1)?.min ?? 0;
  const click = (e: unknown) => {
    const state = e as { activeLabel?: number | string; activeTooltipIndex?: number | string } | null;
    const index = state?.activeTooltipIndex !== undefined ? Number(state.activeTooltipIndex) : NaN;
    const minute = state?.activeLabel !== undefined ? Number(state.activeLabel) : data[index]?.min;
    if (onSplit && minute !== undefined && Number.isFinite(minute)) onSplit(Math.round(minute * 60));
  };
  return (
    <div className="flex flex-col gap-1">
      <div
        className="h-56 w-full"
        role="img"
        aria-label="Power and heart rate over the ride; lap splits as vertical lines"
      >
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart
            data={data}
            margin={{ top: 8, right: 8, bottom: 0, left: -16 }}
            onClick={click}
            style={{ cursor: onSplit ? "crosshair" : undefined }}
          >
            <XAxis dataKey="min" type="number" domain={[0, last]} tick={{ fontSize: 11 }} unit=" min" />
            <YAxis yAxisId="w" tick={{ fontSize: 11 }} />
            <YAxis yAxisId="hr" orientation="right" tick={{ fontSize: 11 }} domain={[60, "dataMax"]} />
            <Area
              yAxisId="w"
              dataKey="power"
              type="monotone"
              stroke="#1F5F5B"
              fill="#1F5F5B"
              fillOpacity={0.25}
              isAnimationActive={false}
              dot={false}
              name="Power (W)"
            />
            <Line
              yAxisId="hr"
              dataKey="hr"
              type="monotone"
              stroke="#B5523B"
              strokeWidth={1.2}
              dot={false}
              isAnimationActive={false}
              name="Heart rate (bpm)"
            />
            {splitsS.map((s) => (
              <ReferenceLine key={s} yAxisId="w" x={s / 60} stroke="#1B2330" strokeDasharray="3 3" />
            ))}
            <Tooltip formatter={(v, name) => [Math.round(Number(v)), name]} labelFormatter={(l) => `${l} min`} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      {wPrimeKj !== null && (
        <div className="h-24 w-full" role="img" aria-label="W′ balance over the ride, in kJ" data-testid="wbal-chart">
          <ResponsiveContainer width="100%" height="100%">
            <ComposedChart data={data} margin={{ top: 4, right: 8, bottom: 0, left: -16 }}>
              <XAxis dataKey="min" type="number" domain={[0, last]} tick={{ fontSize: 11 }} unit=" min" />
              <YAxis yAxisId="kj" tick={{ fontSize: 11 }} domain={[0, Math.ceil(wPrimeKj)]} unit=" kJ" />
              {/* An empty right axis as wide as the heart-rate axis above keeps both plots on one time scale. */}
              <YAxis yAxisId="pad" orientation="right" tick={false} axisLine={false} tickLine={false} />
              <Area
                yAxisId="kj"
                dataKey="wbal"
                type="stepAfter"
                stroke="#1B2330"
                fill="#B5523B"
                fillOpacity={0.18}
                isAnimationActive={false}
                dot={false}
                name="W′ balance (kJ)"
              />
              <Tooltip
                formatter={(v) => [`${Number(v).toFixed(1)} kJ`, "W′ balance"]}
                labelFormatter={(l) => `${l} min`}
              />
            </ComposedChart>
          </ResponsiveContainer>
        </div>
      )}
    </div>
  );
}
