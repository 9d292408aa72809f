import { Area, ComposedChart, Line, ReferenceArea, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";

/** Power and heart rate over a ride, with the test window shaded. */
export function TraceChart({
  trace,
  window,
}: {
  trace: { t: number; power: number | null; hr: number | null }[];
  window?: { startS: number; lengthS: number } | null;
}) {
  const data = trace.map((p) => ({ min: Math.round((p.t / 60) * 10) / 10, power: p.power, hr: p.hr }));
  return (
    <div
      className="h-56 w-full"
      role="img"
      aria-label="Power and heart rate over the ride, with the test window shaded"
    >
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} margin={{ top: 8, right: 8, bottom: 0, left: -16 }}>
          <XAxis dataKey="min" type="number" domain={["dataMin", "dataMax"]} tick={{ fontSize: 11 }} unit=" min" />
          <YAxis yAxisId="w" tick={{ fontSize: 11 }} />
          <YAxis yAxisId="hr" orientation="right" tick={{ fontSize: 11 }} domain={[60, "dataMax"]} />
          {window && (
            <ReferenceArea
              yAxisId="w"
              x1={window.startS / 60}
              x2={(window.startS + window.lengthS) / 60}
              fill="#B5523B"
              fillOpacity={0.12}
              stroke="#B5523B"
              strokeOpacity={0.5}
            />
          )}
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
          <Tooltip formatter={(v, name) => [Math.round(Number(v)), name]} labelFormatter={(l) => `${l} min`} />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}
