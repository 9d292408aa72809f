/**
 * The pacing plan on a session page: chart, printable sheet and the card that edits the split. Over 300 lines because
 * the three render one PacingData, the sheet draws the chart and the card holds the sheet; they change together.
 */
import { Form, useFetcher } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { EFFORT_WORDS } from "~/lib/effort";
import { PLAN_VERDICT_WORDS, type PacingPlan } from "~/lib/training";
import type { sessionPageData } from "~/.server/services/session-page";

/** A paced test's plan, its basis and (once ridden) the outcome, as the session page's loader sends it. */
export type PacingData = NonNullable<Awaited<ReturnType<typeof sessionPageData>>["pacing"]>;

const clock = (s: number) => {
  const r = Math.round(s);
  return `${Math.floor(r / 60)}:${String(r % 60).padStart(2, "0")}`;
};

const TEST_NAME: Record<string, string> = {
  twenty_minute: "20-minute effort",
  eight_minute: "8-minute effort (each of the two)",
  ramp: "ramp",
};

/**
 * The plan as a step chart of our own: one bar per segment (height = target), a dashed line at the expected power,
 * and, once ridden, a brick tick for the ridden mean of each segment.
 */
export function PacingChart({ plan, ridden }: { plan: PacingPlan; ridden?: number[] | null }) {
  const W = 320;
  const H = 110;
  const values = [...plan.segments.map((s) => s.targetW), ...(ridden ?? []), plan.expectedW];
  const top = Math.max(...values) * 1.04;
  const bottom = Math.min(...values) * 0.85;
  const y = (w: number) => H - 16 - ((w - bottom) / (top - bottom)) * (H - 24);
  const total = plan.segments.reduce((a, s) => a + s.durationS, 0);
  const x = (t: number) => (t / total) * W;
  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      className="h-auto w-full max-w-md"
      role="img"
      aria-label={`Pacing plan: ${plan.segments.map((s) => `${s.targetW} W`).join(", then ")}${ridden ? `; ridden ${ridden.map((r) => `${Math.round(r)} W`).join(", ")}` : ""}`}
      data-testid="pacing-chart"
    >
      {plan.segments.map((s, k) => (
        <g key={k}>
          <rect
            x={x(s.startS) + 1}
            y={y(s.targetW)}
            width={x(s.durationS) - 2}
            height={H - 16 - y(s.targetW)}
            fill="#1F5F5B"
            fillOpacity={0.35 + (0.5 * k) / Math.max(1, plan.segments.length - 1)}
            rx={2}
          />
          <text
            x={x(s.startS + s.durationS / 2)}
            y={H - 21}
            textAnchor="middle"
            fontSize={10}
            fontWeight={600}
            fill={k === 0 ? "#1B2330" : "#FFFFFF"}
          >
            {s.targetW} W
          </text>
          <text x={x(s.startS + s.durationS / 2)} y={H - 4} textAnchor="middle" fontSize={9} fill="#5b6472">
            {clock(s.startS)}–{clock(s.startS + s.durationS)}
          </text>
          {ridden?.[k] != null && (
            <line
              x1={x(s.startS) + 6}
              x2={x(s.startS + s.durationS) - 6}
              y1={y(ridden[k])}
              y2={y(ridden[k])}
              stroke="#B5523B"
              strokeWidth={3}
            />
          )}
        </g>
      ))}
      <line
        x1={0}
        x2={W}
        y1={y(plan.expectedW)}
        y2={y(plan.expectedW)}
        stroke="#1B2330"
        strokeDasharray="4 3"
        strokeWidth={1}
      />
    </svg>
  );
}

function basisText(data: PacingData) {
  const b = data.basis!;
  return b.source === "ramp"
    ? `from your ramp test of ${b.rampTestedOn} (threshold ${Math.round(b.thresholdW)} W)`
    : `from your threshold of ${Math.round(b.thresholdW)} W`;
}

/** The printable part: expected power, segments with cues, laps. Used on the session page and the print view. */
export function PacingSheet({ data, sessionName }: { data: PacingData; sessionName?: string }) {
  const plan = data.plan!;
  return (
    <div className="flex flex-col gap-3">
      {sessionName && <h1 className="text-xl font-semibold">{sessionName}: pacing plan</h1>}
      <p className="num text-sm">
        {plan.protocol === "ramp" ? (
          <>
            Expected best minute <strong className="text-lg">{plan.expectedW} W</strong> {basisText(data)}: steps of{" "}
            {plan.ramp!.stepW} W every minute from {plan.ramp!.startW} W, to about {plan.ramp!.expectedLastStepW} W
            after {Math.round(plan.ramp!.expectedDurationS / 60)} minutes.
          </>
        ) : (
          <>
            Expected power for the {TEST_NAME[plan.protocol]}:{" "}
            <strong className="text-lg" data-testid="expected-power">
              {plan.expectedW} W
            </strong>
            , {basisText(data)}.
          </>
        )}
      </p>
      <PacingChart plan={plan} ridden={data.outcome?.segments.map((s) => s.riddenW)} />
      <ol className="num flex flex-col text-sm" data-testid="pacing-segments">
        {plan.segments.map((s) => (
          <li
            key={s.index}
            className="grid grid-cols-[5.5rem_1fr] gap-x-3 gap-y-0.5 border-t border-line py-1.5 sm:grid-cols-[6rem_7.5rem_11rem_1fr]"
            data-testid="segment"
          >
            <span className="whitespace-nowrap">
              {clock(s.startS)}–{clock(s.startS + s.durationS)}
            </span>
            <span className="whitespace-nowrap">
              <strong data-testid="segment-target">{s.targetW} W</strong>
              {plan.protocol !== "ramp" && (
                <span className="ml-1 text-xs text-ink-soft sm:ml-0 sm:block">{s.pct} % of expected</span>
              )}
            </span>
            <span className="whitespace-nowrap max-sm:col-start-2">
              effort {s.effortScore} <span className="text-xs text-ink-soft">{EFFORT_WORDS[s.effortScore]}</span>
            </span>
            <span className="max-sm:col-span-2">{s.cue}</span>
          </li>
        ))}
      </ol>
      {plan.laps && (
        <div className="overflow-x-auto">
          <p className="text-sm">
            Loop{plan.laps.lengthM ? ` of ${(plan.laps.lengthM / 1000).toFixed(2)} km` : ""}: about{" "}
            <strong className="num">{clock(plan.laps.lapTimeS)}</strong> a lap at the expected power
            {plan.laps.lengthM ? " (flat road, still air, typical bike position: a guide, not a promise)" : ""}.
          </p>
          <table className="num mt-1 w-full text-sm" data-testid="pacing-laps">
            <thead className="text-left text-xs text-ink-soft">
              <tr>
                <th className="py-1 pr-2 font-medium">Lap</th>
                <th className="py-1 pr-2 font-medium">Starts</th>
                <th className="py-1 pr-2 font-medium">Target</th>
                <th className="py-1 font-medium">Expected time</th>
              </tr>
            </thead>
            <tbody>
              {plan.laps.laps.map((l) => (
                <tr key={l.lap} className="border-t border-line">
                  <td className="py-1 pr-2">
                    {l.lap}
                    {l.fraction < 1 ? ` (${Math.round(l.fraction * 100)} % of a lap)` : ""}
                  </td>
                  <td className="py-1 pr-2">{clock(l.startS)}</td>
                  <td className="py-1 pr-2">{l.targetW} W</td>
                  <td className="py-1">{clock(l.expectedS)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <p className="text-xs text-ink-soft">
        Stop at once at chest pain or pressure, dizziness, unusual breathlessness, palpitations or nausea. Guidance for
        training, not medical advice.
      </p>
    </div>
  );
}

export function PacingCard({
  data,
  printHref,
  canEditSplit,
}: {
  data: PacingData;
  printHref: string;
  canEditSplit: boolean;
}) {
  if (!data.plan) {
    return (
      <Card data-testid="pacing-plan">
        <h2 className="font-semibold">Pacing plan</h2>
        <p className="mt-1 text-sm text-ink-soft">{data.problem}</p>
      </Card>
    );
  }
  const plan = data.plan;
  return (
    <Card data-testid="pacing-plan">
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <h2 className="font-semibold">Pacing plan</h2>
        <a href={printHref} className={buttonClass("secondary", "py-1")} target="_blank" rel="noreferrer">
          Print pacing plan
        </a>
      </div>
      {data.problem && <FormMessage tone="error">{data.problem}</FormMessage>}
      <PacingSheet data={data} />
      {plan.protocol !== "ramp" && <LapForm lap={data.lap} />}
      {canEditSplit && plan.protocol !== "ramp" && <SplitForm split={data.split} custom={data.customSplit} />}
      {data.outcome && <PacingOutcomeView outcome={data.outcome} />}
    </Card>
  );
}

function LapForm({ lap }: { lap: PacingData["lap"] }) {
  return (
    <Form method="get" className="mt-3 flex flex-wrap items-end gap-2 text-sm" preventScrollReset>
      <label className="flex flex-col gap-1">
        <span className="font-medium">Loop length (km)</span>
        <input
          name="lapKm"
          inputMode="decimal"
          defaultValue={lap?.lengthM ? String(lap.lengthM / 1000) : ""}
          className="num w-28 rounded-lg border border-line px-2 py-1.5"
        />
      </label>
      <span className="pb-2 text-ink-soft">or</span>
      <label className="flex flex-col gap-1">
        <span className="font-medium">Lap time (m:ss)</span>
        <input
          name="lapTime"
          placeholder="5:30"
          defaultValue={lap?.lapTimeS ? clock(lap.lapTimeS) : ""}
          className="num w-28 rounded-lg border border-line px-2 py-1.5"
        />
      </label>
      <button className={buttonClass("secondary", "py-1.5")}>Plan the laps</button>
    </Form>
  );
}

function SplitForm({ split, custom }: { split: number[]; custom: boolean }) {
  const fetcher = useFetcher<{ ok: boolean; message: string }>();
  return (
    <fetcher.Form
      method="post"
      className="mt-4 flex flex-col gap-2 border-t border-line pt-3 text-sm"
      data-testid="split-form"
    >
      <input type="hidden" name="intent" value="pacing-split" />
      <p className="font-medium">Segments for this test (% of expected power){custom ? "" : " — the usual split"}</p>
      <div className="flex flex-wrap gap-2">
        {split.map((p, k) => (
          <label key={`${k}-${p}`} className="flex items-center gap-1">
            <span className="sr-only">Segment {k + 1} (%)</span>
            <input
              name="split"
              type="number"
              step="0.5"
              min={85}
              max={115}
              defaultValue={p}
              className="num w-20 rounded-lg border border-line px-2 py-1"
            />
          </label>
        ))}
      </div>
      <div className="flex flex-wrap gap-2">
        <button className={buttonClass("primary", "py-1")} disabled={fetcher.state !== "idle"}>
          Save split
        </button>
        {custom && (
          <button name="reset" value="1" className={buttonClass("ghost", "py-1")} disabled={fetcher.state !== "idle"}>
            Back to the usual split
          </button>
        )}
      </div>
      {fetcher.data && <FormMessage tone={fetcher.data.ok ? "ok" : "error"}>{fetcher.data.message}</FormMessage>}
    </fetcher.Form>
  );
}

function PacingOutcomeView({ outcome }: { outcome: NonNullable<PacingData["outcome"]> }) {
  return (
    <div className="mt-4 border-t border-line pt-3" data-testid="pacing-outcome">
      <h3 className="font-semibold">
        How you paced it:{" "}
        <span className={outcome.verdict === "to_plan" ? "text-teal" : "text-brick"}>
          {PLAN_VERDICT_WORDS[outcome.verdict]}
        </span>
      </h3>
      <p className="text-xs text-ink-soft">
        The best {Math.round(outcome.windowS / 60)} minutes of the file, from {clock(outcome.effortStartS)}, averaged{" "}
        <span className="num">{Math.round(outcome.meanW)} W</span> ({outcome.levelPct} % of expected).
      </p>
      <table className="num mt-2 w-full text-sm">
        <thead className="text-left text-xs text-ink-soft">
          <tr>
            <th className="py-1 font-medium">Segment</th>
            <th className="py-1 font-medium">Planned</th>
            <th className="py-1 font-medium">Ridden</th>
            <th className="py-1 font-medium">Difference</th>
          </tr>
        </thead>
        <tbody>
          {outcome.segments.map((s) => (
            <tr key={s.index} className="border-t border-line" data-testid="ridden-segment">
              <td className="py-1">{s.index + 1}</td>
              <td className="py-1">{s.plannedW} W</td>
              <td className="py-1">{s.riddenW} W</td>
              <td className={`py-1 ${Math.abs(s.diffPct) > 3 ? "text-brick" : ""}`}>
                {s.diffPct > 0 ? "+" : ""}
                {s.diffPct} %
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 text-sm">{outcome.message}</p>
    </div>
  );
}

/** The loop typed on the page, carried to the print view. */
export function pacingQuery(lap: PacingData["lap"]) {
  if (lap?.lengthM) return `?lapKm=${lap.lengthM / 1000}`;
  if (lap?.lapTimeS) return `?lapTime=${lap.lapTimeS}`;
  return "";
}
