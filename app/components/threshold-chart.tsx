import { CartesianGrid, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";

/** One threshold over time as a step line; each point is a change, tests are the labelled dots. */
export function ThresholdChart({
  points,
  unit,
}: {
  points: { date: string; value: number; source: string }[];
  unit: string;
}) {
  const data = points.map((p) => ({ ...p, t: Date.parse(`${p.date}T00:00:00Z`) }));
  const pace = unit === "s/km" || unit === "s/100m";
  const fmt = (v: number) =>
    pace ? `${Math.floor(v / 60)}:${String(Math.round(v % 60)).padStart(2, "0")}` : String(Math.round(v));
  return (
    <div className="h-56 w-full" role="img" aria-label={`Threshold history in ${unit}`}>
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} margin={{ top: 8, right: 16, bottom: 0, left: 0 }}>
          <CartesianGrid stroke="#ede7dc" />
          <XAxis
            dataKey="t"
            type="number"
            scale="time"
            domain={["dataMin", "dataMax"]}
            tickFormatter={(t) => new Date(t).toISOString().slice(5, 10)}
            tick={{ fontSize: 11 }}
          />
          <YAxis domain={["auto", "auto"]} reversed={pace} tickFormatter={fmt} tick={{ fontSize: 11 }} width={48} />
          <Tooltip
            labelFormatter={(t) => new Date(Number(t)).toISOString().slice(0, 10)}
            formatter={(v) => [`${fmt(Number(v))} ${unit}`, "threshold"]}
          />
          <Line
            type="stepAfter"
            dataKey="value"
            stroke="#1F5F5B"
            strokeWidth={2}
            dot={{ r: 4, fill: "#B5523B", stroke: "#B5523B" }}
            isAnimationActive={false}
          />
        </LineChart>
      </ResponsiveContainer>
    </div>
  );
}
