// Over 300 lines on purpose: one chart per figure the load page shows, all drawn from the same series and range
// form; split per chart, each module would only re-import the same data type, colours and axis formatting.
import { Form, useLocation, useNavigation } from "react-router";
import {
  Area,
  Bar,
  BarChart,
  CartesianGrid,
  ComposedChart,
  Legend,
  Line,
  LineChart,
  ReferenceArea,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { addDays } from "~/lib/dates";
import { LOAD_RANGES } from "~/lib/load-ranges";
import type { loadSeries } from "~/.server/services/load";
import type { powerCurveComparison } from "~/.server/services/load-figures";

/** What the load page's loader sends: the series from the load model and the power-curve comparison, as the server types them. */
export type LoadData = Awaited<ReturnType<typeof loadSeries>> & {
  powerCurve: Awaited<ReturnType<typeof powerCurveComparison>>;
};

const BAND_WORDS: Record<string, string> = {
  low: "below your usual load",
  usual: "within your usual range",
  raised: "raised",
  spike: "a spike: well above your usual load",
};
const short = (d: string) => d.slice(5);
const windowLabel = (s: number) => (s < 60 ? `${s}s` : s < 3600 ? `${s / 60}m` : `${s / 3600}h`);

/** The load page's charts. The range is a GET form: the loader reads `?range=`, so the period is part of the URL. */
export function LoadCharts({ athleteId, data, range }: { athleteId: number; data: LoadData; range: string }) {
  const navigation = useNavigation();
  const location = useLocation();
  const thisWeek = data.weekly.find((w) => w.week <= data.today && data.today < addDays(w.week, 7))?.week;
  // Past weeks show what was done, the current and later weeks what is planned; the range is the same either way.
  const weekly = data.weekly.map((w) => ({
    ...w,
    range: w.usual ? [w.usual.low, w.usual.high] : null,
    done: w.week <= data.today || w.doneLoad > 0 ? w.doneLoad : null,
  }));
  const now = data.daily.find((d) => d.date === data.today);
  const noRatio = data.daily.every((d) => d.acwrRolling === null);
  return (
    <div className="flex flex-col gap-6">
      <div className="flex flex-wrap items-center gap-2">
        <Form method="get" preventScrollReset className="flex flex-wrap gap-2" role="group" aria-label="Range">
          {LOAD_RANGES.map((r) => (
            <button
              key={r.key}
              type="submit"
              name="range"
              value={r.key}
              aria-pressed={range === r.key}
              className={buttonClass(range === r.key ? "primary" : "secondary", "px-3 py-1")}
            >
              {r.label}
            </button>
          ))}
        </Form>
        <a
          href={`/api/athletes/${athleteId}/load?from=${data.from}&to=${data.to}&format=csv`}
          className="ml-auto text-sm text-teal underline"
          download
        >
          Download the daily series (CSV)
        </a>
        {navigation.state === "loading" && navigation.location.pathname === location.pathname && (
          <span className="text-sm text-ink-soft">Loading…</span>
        )}
      </div>
      <div className="grid gap-6 lg:grid-cols-[1fr_20rem]">
        <Card>
          <h2 className="font-semibold">Weekly load and the usual range</h2>
          <p className="text-xs text-ink-soft">
            Filled: load done (effort score × minutes; a ride without an effort score counts its band load from power).
            Outlined: planned. Shaded: the usual range, 0.8–1.3 × the average week of the 28 days before (guidance
            only).
          </p>
          <div className="mt-2 h-72" data-testid="weekly-load-chart">
            <ResponsiveContainer>
              <ComposedChart data={weekly} margin={{ top: 8, right: 8, bottom: 0, left: -12 }} barCategoryGap="22%">
                <CartesianGrid stroke="#ede7dc" vertical={false} />
                <XAxis xAxisId="a" dataKey="week" tickFormatter={short} tick={{ fontSize: 11 }} />
                <XAxis xAxisId="b" dataKey="week" hide />
                <YAxis tick={{ fontSize: 11 }} />
                <Tooltip />
                <Area
                  xAxisId="a"
                  dataKey="range"
                  name="Usual range"
                  type="step"
                  stroke="none"
                  fill="#8fa58a"
                  fillOpacity={0.28}
                  isAnimationActive={false}
                  connectNulls={false}
                />
                <Bar
                  xAxisId="a"
                  dataKey="plannedLoad"
                  name="Planned"
                  fill="transparent"
                  stroke="#1F5F5B"
                  strokeWidth={1.5}
                  strokeDasharray="0"
                  isAnimationActive={false}
                />
                <Bar xAxisId="b" dataKey="done" name="Done" fill="#1F5F5B" isAnimationActive={false} barSize={14} />
                {thisWeek && (
                  <ReferenceArea
                    xAxisId="a"
                    x1={thisWeek}
                    x2={thisWeek}
                    fill="#B5523B"
                    fillOpacity={0.06}
                    label={{ value: "this week", fontSize: 11, fill: "#B5523B", position: "insideTop" }}
                  />
                )}
              </ComposedChart>
            </ResponsiveContainer>
          </div>
          <ul className="mt-2 flex flex-wrap gap-4 text-xs text-ink-soft" aria-label="Key">
            <li className="flex items-center gap-1.5">
              <span className="inline-block h-3 w-3 rounded-sm bg-teal" aria-hidden /> Done
            </li>
            <li className="flex items-center gap-1.5">
              <span className="inline-block h-3 w-3 rounded-sm border-[1.5px] border-teal" aria-hidden /> Planned
            </li>
            <li className="flex items-center gap-1.5">
              <span
                className="inline-block h-3 w-3 rounded-sm"
                style={{ background: "#8fa58a", opacity: 0.5 }}
                aria-hidden
              />{" "}
              Usual range
            </li>
          </ul>
        </Card>
        <Card>
          <h2 className="font-semibold">Readiness</h2>
          <ul className="mt-2 flex flex-col gap-2 text-sm" data-testid="readiness-note">
            {data.readiness.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
          {now && (
            <dl className="num mt-3 grid grid-cols-2 gap-1 text-sm">
              <dt className="text-ink-soft">Fitness (42-day)</dt>
              <dd className="text-right">{Math.round(now.fitness)}</dd>
              <dt className="text-ink-soft">Fatigue (7-day)</dt>
              <dd className="text-right">{Math.round(now.fatigue)}</dd>
              <dt className="text-ink-soft">Balance</dt>
              <dd className="text-right">{Math.round(now.balance)}</dd>
            </dl>
          )}
          <p className="mt-3 text-xs text-ink-soft">
            Fitness and fatigue are exponentially weighted daily effort loads with 42- and 7-day time constants
            (Banister's impulse–response model); balance is fitness minus fatigue. A guide for the coach, not a verdict.
          </p>
        </Card>
      </div>
      <div className="grid gap-6 xl:grid-cols-2">
        <Card>
          <h2 className="font-semibold">Minutes per band, by week</h2>
          <p className="text-xs text-ink-soft">
            From ride files with power, against the threshold on the day of the ride.
          </p>
          <div className="mt-2 h-56" data-testid="band-minutes-chart">
            <ResponsiveContainer>
              <BarChart
                data={data.weekly.map((w) => ({
                  week: w.week,
                  ...Object.fromEntries(w.bandMinutes.map((m, i) => [data.bands[i]?.name ?? `#${i + 1}`, m])),
                }))}
                margin={{ top: 8, right: 8, bottom: 0, left: -12 }}
              >
                <XAxis dataKey="week" tickFormatter={short} tick={{ fontSize: 11 }} />
                <YAxis tick={{ fontSize: 11 }} />
                <Tooltip />
                {data.bands.map((b) => (
                  <Bar
                    key={b.name}
                    dataKey={b.name}
                    stackId="z"
                    fill={b.shade}
                    stroke={b.aboveThreshold ? "#B5523B" : undefined}
                    strokeWidth={b.aboveThreshold ? 1 : 0}
                    isAnimationActive={false}
                  />
                ))}
              </BarChart>
            </ResponsiveContainer>
          </div>
          <ul className="mt-2 flex flex-wrap gap-3 text-xs text-ink-soft" aria-label="Bands">
            {data.bands.map((b) => (
              <li key={b.name} className="flex items-center gap-1.5">
                <span
                  className="inline-block h-3 w-3 rounded-sm"
                  style={{ background: b.shade, boxShadow: b.aboveThreshold ? "inset 0 0 0 1.5px #B5523B" : undefined }}
                  aria-hidden
                />
                {b.name}
              </li>
            ))}
          </ul>
          {data.weekly.every((w) => w.bandMinutes.every((m) => m === 0)) && (
            <p className="mt-1 text-sm text-ink-soft">No ride files with power in this range yet.</p>
          )}
        </Card>
        <Card>
          <h2 className="font-semibold">Acute:chronic load ratio</h2>
          <p className="text-xs text-ink-soft">
            7-day against 28-day load (rolling; the exponentially weighted variant thin). Guidance only
            {data.latestRatio !== null ? `; now ${data.latestRatio}, ${BAND_WORDS[data.band ?? "usual"]}` : ""}.
          </p>
          {noRatio && (
            <p className="mt-2 text-sm font-medium" data-testid="ratio-not-enough">
              Not enough history: the ratio needs 28 days of recorded sessions ({data.historyDays} so far).
            </p>
          )}
          <div className="mt-2 h-56">
            <ResponsiveContainer>
              <LineChart data={data.daily.filter((d) => !d.future)} margin={{ top: 8, right: 8, bottom: 0, left: -12 }}>
                <ReferenceArea y1={0.8} y2={1.3} fill="#8fa58a" fillOpacity={0.18} />
                <ReferenceArea y1={1.5} y2={3} fill="#B5523B" fillOpacity={0.1} />
                <XAxis dataKey="date" tickFormatter={short} tick={{ fontSize: 11 }} minTickGap={24} />
                <YAxis domain={[0, 2.2]} tick={{ fontSize: 11 }} />
                <Tooltip />
                <Line
                  dataKey="acwrRolling"
                  name="Rolling"
                  stroke="#1F5F5B"
                  strokeWidth={2}
                  dot={false}
                  isAnimationActive={false}
                />
                <Line
                  dataKey="acwrEwma"
                  name="Exponentially weighted"
                  stroke="#5f6f7f"
                  strokeWidth={1}
                  dot={false}
                  isAnimationActive={false}
                />
              </LineChart>
            </ResponsiveContainer>
          </div>
        </Card>
        <Card>
          <h2 className="font-semibold">Power curve: last 90 days and the 90 before</h2>
          {data.powerCurve.length ? (
            <div className="mt-2 h-56">
              <ResponsiveContainer>
                <LineChart data={data.powerCurve} margin={{ top: 8, right: 8, bottom: 0, left: -12 }}>
                  <CartesianGrid stroke="#ede7dc" />
                  <XAxis
                    dataKey="windowS"
                    scale="log"
                    type="number"
                    domain={["dataMin", "dataMax"]}
                    tickFormatter={windowLabel}
                    tick={{ fontSize: 11 }}
                  />
                  <YAxis tick={{ fontSize: 11 }} />
                  <Tooltip labelFormatter={(l) => windowLabel(Number(l))} />
                  <Legend />
                  <Line
                    dataKey="recent"
                    name="Last 90 days"
                    stroke="#1F5F5B"
                    strokeWidth={2}
                    dot={false}
                    isAnimationActive={false}
                  />
                  <Line
                    dataKey="previous"
                    name="90 days before"
                    stroke="#B5523B"
                    strokeDasharray="4 3"
                    dot={false}
                    isAnimationActive={false}
                  />
                </LineChart>
              </ResponsiveContainer>
            </div>
          ) : (
            <p className="mt-2 text-sm text-ink-soft">Upload ride files with power to see the curve.</p>
          )}
        </Card>
      </div>
      <Card className="overflow-x-auto">
        <h2 className="font-semibold">Compliance, monotony and strain by week</h2>
        <table className="num mt-2 w-full min-w-[40rem] text-left text-sm" data-testid="compliance-table">
          <thead className="text-ink-soft">
            <tr>
              <th className="py-1 font-medium">Week of</th>
              <th className="py-1 font-medium">Sessions done / planned</th>
              <th className="py-1 font-medium">Minutes done / planned</th>
              <th className="py-1 font-medium">Load done / planned</th>
              <th className="py-1 font-medium">Time in target</th>
              <th className="py-1 font-medium">Monotony</th>
              <th className="py-1 font-medium">Strain</th>
            </tr>
          </thead>
          <tbody>
            {data.weekly.map((w) => (
              <tr key={w.week} className="border-t border-line/60">
                <td className="py-1">{w.week}</td>
                <td className="py-1">
                  {w.doneSessions} / {w.plannedSessions}
                </td>
                <td className="py-1">
                  {w.doneMinutes} / {w.plannedMinutes}
                </td>
                <td className="py-1">
                  {Math.round(w.doneLoad)} / {Math.round(w.plannedLoad)}
                  {w.powerLoad ? (
                    <span className="text-ink-soft"> (incl. {Math.round(w.powerLoad)} from power)</span>
                  ) : null}
                </td>
                <td className="py-1">{w.inTargetPct == null ? "—" : `${w.inTargetPct} %`}</td>
                <td className="py-1">{w.monotony ?? "—"}</td>
                <td className="py-1">{w.strain ?? "—"}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-2 text-xs text-ink-soft">
          Monotony is mean daily load over its standard deviation, strain is weekly load times monotony (Foster 1998).
        </p>
      </Card>
    </div>
  );
}
