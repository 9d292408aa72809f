import { useState } from "react";
import { formatClock, formatMinutes, parseDuration } from "~/lib/duration";
import type { Block, Metric } from "~/lib/training";

// The fields of one step, by kind. Values stay numbers in the block (NaN while half-typed), so the list, the
// estimate and the validation all read the same object.

const METRICS: [Metric, string][] = [
  ["power", "Power"],
  ["heart_rate", "Heart rate"],
  ["pace", "Pace"],
];

export function BlockFields({
  block,
  onChange,
  err,
  label,
}: {
  block: Block;
  onChange: (b: Block) => void;
  err: (p: string) => string | undefined;
  label: string;
}) {
  switch (block.kind) {
    case "warmup":
    case "steady":
    case "cooldown":
      return (
        <>
          <DurationInput
            label="Duration"
            aria={`${label} duration`}
            seconds={block.durationS}
            onChange={(durationS) => onChange({ ...block, durationS })}
            error={err("durationS")}
          />
          <MetricSelect
            value={block.target.metric}
            onChange={(metric) => onChange({ ...block, target: { ...block.target, metric } })}
            aria={`${label} metric`}
          />
          <PctInput
            label="Low %"
            aria={`${label} low percent`}
            value={block.target.lowPct}
            onChange={(lowPct) => onChange({ ...block, target: { ...block.target, lowPct: lowPct ?? NaN } })}
            error={err("target.lowPct")}
          />
          <PctInput
            label="High % (optional)"
            aria={`${label} high percent`}
            value={block.target.highPct ?? null}
            optional
            onChange={(highPct) => onChange({ ...block, target: { ...block.target, highPct } })}
            error={err("target.highPct")}
          />
        </>
      );
    case "ramp":
      return (
        <>
          <DurationInput
            label="Duration"
            aria={`${label} duration`}
            seconds={block.durationS}
            onChange={(durationS) => onChange({ ...block, durationS })}
            error={err("durationS")}
          />
          <MetricSelect
            value={block.metric}
            onChange={(metric) => onChange({ ...block, metric })}
            aria={`${label} metric`}
          />
          <PctInput
            label="From %"
            aria={`${label} from percent`}
            value={block.fromPct}
            onChange={(fromPct) => onChange({ ...block, fromPct: fromPct ?? NaN })}
            error={err("fromPct")}
          />
          <PctInput
            label="To %"
            aria={`${label} to percent`}
            value={block.toPct}
            onChange={(toPct) => onChange({ ...block, toPct: toPct ?? NaN })}
            error={err("toPct")}
          />
        </>
      );
    case "repeats":
      return (
        <>
          <label className="flex flex-col gap-1 text-sm">
            <span className="font-medium">Repeats</span>
            <input
              type="number"
              min={1}
              max={50}
              value={Number.isFinite(block.count) ? block.count : ""}
              onChange={(e) => onChange({ ...block, count: e.target.value === "" ? NaN : Number(e.target.value) })}
              aria-label={`${label} repeat count`}
              aria-invalid={err("count") ? true : undefined}
              className={`num rounded-lg border px-2 py-1.5 ${err("count") ? "border-brick" : "border-line"}`}
            />
            {err("count") && <span className="text-xs text-brick">{err("count")}</span>}
          </label>
          <DurationInput
            label="Work"
            aria={`${label} work duration`}
            seconds={block.work.durationS}
            onChange={(durationS) => onChange({ ...block, work: { ...block.work, durationS } })}
            error={err("work.durationS")}
          />
          <PctInput
            label="Work low %"
            aria={`${label} work low percent`}
            value={block.work.target.lowPct}
            onChange={(lowPct) =>
              onChange({ ...block, work: { ...block.work, target: { ...block.work.target, lowPct: lowPct ?? NaN } } })
            }
            error={err("work.target.lowPct")}
          />
          <PctInput
            label="Work high %"
            aria={`${label} work high percent`}
            optional
            value={block.work.target.highPct ?? null}
            onChange={(highPct) =>
              onChange({ ...block, work: { ...block.work, target: { ...block.work.target, highPct } } })
            }
            error={err("work.target.highPct")}
          />
          <MetricSelect
            value={block.work.target.metric}
            onChange={(metric) =>
              onChange({
                ...block,
                work: { ...block.work, target: { ...block.work.target, metric } },
                recovery: {
                  ...block.recovery,
                  target: block.recovery.target ? { ...block.recovery.target, metric } : null,
                },
              })
            }
            aria={`${label} metric`}
          />
          <DurationInput
            label="Recovery"
            aria={`${label} recovery duration`}
            seconds={block.recovery.durationS}
            onChange={(durationS) => onChange({ ...block, recovery: { ...block.recovery, durationS } })}
            error={err("recovery.durationS")}
          />
          <PctInput
            label="Recovery % (optional)"
            aria={`${label} recovery percent`}
            optional
            value={block.recovery.target?.lowPct ?? null}
            onChange={(lowPct) =>
              onChange({
                ...block,
                recovery: {
                  ...block.recovery,
                  target: lowPct === null ? null : { metric: block.work.target.metric, lowPct },
                },
              })
            }
            error={err("recovery.target.lowPct")}
          />
        </>
      );
    case "open":
      return (
        <>
          <DurationInput
            label="Duration"
            aria={`${label} duration`}
            seconds={block.durationS}
            onChange={(durationS) => onChange({ ...block, durationS })}
            error={err("durationS")}
          />
          <label className="col-span-1 flex flex-col gap-1 text-sm sm:col-span-3">
            <span className="font-medium">Cue</span>
            <input
              value={block.cue ?? ""}
              onChange={(e) => onChange({ ...block, cue: e.target.value })}
              maxLength={200}
              className="rounded-lg border border-line px-2 py-1.5"
              aria-label={`${label} cue`}
            />
          </label>
        </>
      );
  }
}

function DurationInput({
  label,
  aria,
  seconds,
  onChange,
  error,
}: {
  label: string;
  aria: string;
  seconds: number;
  onChange: (s: number) => void;
  error?: string;
}) {
  const [text, setText] = useState(Number.isFinite(seconds) ? formatClock(seconds) : "");
  const [bad, setBad] = useState(false);
  const message = bad ? "Use m:ss or h:mm:ss." : error;
  return (
    <label className="flex flex-col gap-1 text-sm">
      <span className="font-medium">{label}</span>
      <input
        value={text}
        inputMode="numeric"
        placeholder="m:ss"
        aria-label={aria}
        aria-invalid={message ? true : undefined}
        onChange={(e) => {
          setText(e.target.value);
          const s = parseDuration(e.target.value);
          setBad(s === null);
          onChange(s ?? NaN);
        }}
        className={`num rounded-lg border px-2 py-1.5 ${message ? "border-brick" : "border-line"}`}
      />
      {message ? (
        <span className="text-xs text-brick">{message}</span>
      ) : (
        <span className="text-xs text-ink-soft">{Number.isFinite(seconds) ? formatMinutes(seconds) : ""}</span>
      )}
    </label>
  );
}

function PctInput({
  label,
  aria,
  value,
  onChange,
  error,
  optional,
}: {
  label: string;
  aria: string;
  value: number | null;
  onChange: (v: number | null) => void;
  error?: string;
  optional?: boolean;
}) {
  return (
    <label className="flex flex-col gap-1 text-sm">
      <span className="font-medium">{label}</span>
      <input
        type="number"
        step="1"
        min={optional ? undefined : 1}
        max={300}
        value={value === null || !Number.isFinite(value) ? "" : value}
        aria-label={aria}
        aria-invalid={error ? true : undefined}
        onChange={(e) => onChange(e.target.value === "" ? (optional ? null : NaN) : Number(e.target.value))}
        className={`num rounded-lg border px-2 py-1.5 ${error ? "border-brick" : "border-line"}`}
      />
      {error && <span className="text-xs text-brick">{error}</span>}
    </label>
  );
}

function MetricSelect({ value, onChange, aria }: { value: Metric; onChange: (m: Metric) => void; aria: string }) {
  return (
    <label className="flex flex-col gap-1 text-sm">
      <span className="font-medium">Target by</span>
      <select
        value={value}
        onChange={(e) => onChange(e.target.value as Metric)}
        aria-label={aria}
        className="rounded-lg border border-line bg-white px-2 py-1.5"
      >
        {METRICS.map(([m, l]) => (
          <option key={m} value={m}>
            {l}
          </option>
        ))}
      </select>
    </label>
  );
}
