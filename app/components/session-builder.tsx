import {
  closestCenter,
  type CollisionDetection,
  DndContext,
  type DragStartEvent,
  PointerSensor,
  useSensor,
  useSensors,
  type Announcements,
  type DragEndEvent,
} from "@dnd-kit/core";
import { arrayMove, SortableContext, useSortable, verticalListSortingStrategy } from "@dnd-kit/sortable";
import { CSS } from "@dnd-kit/utilities";
import { useMemo, useRef, useState } from "react";
import { StepKeyboardSensor, type StepKey } from "~/components/board/step-keyboard-sensor";
import { Form, useNavigation } from "react-router";
import { SessionProfile } from "~/components/session-profile";
import { buttonClass } from "~/components/ui/button";
import { FormMessage } from "~/components/ui/field";
import { formatClock, formatMinutes, parseDuration } from "~/lib/duration";
import { BLOCK_LABEL, describeBlock, newBlock, SPORTS, SPORT_LABEL } from "~/lib/sessions";
import { useBandSets } from "~/components/bands-context";
import { BLOCK_KINDS, bandAboveThreshold, bandSetKeyFor, bandShade, estimateSession, expandBlocks, validateBlocks, type Block, type Metric } from "~/lib/training";

type Keyed = { key: string; block: Block };
let nextKey = 1;
const keyed = (block: Block): Keyed => ({ key: `b${nextKey++}`, block });

export interface BuilderValues {
  name: string;
  sport: string;
  description: string;
  tags: string[];
  blocks: Block[];
}

const METRICS: [Metric, string][] = [
  ["power", "Power"],
  ["heart_rate", "Heart rate"],
  ["pace", "Pace"],
];

/** The metric most of a session's targeted blocks use: its band set shades the estimate. */
function mainMetric(blocks: Block[]): Metric {
  const count = new Map<Metric, number>();
  for (const b of blocks) {
    const m = b.kind === "open" ? null : b.kind === "ramp" ? b.metric : b.kind === "repeats" ? b.work.target.metric : b.target.metric;
    if (m) count.set(m, (count.get(m) ?? 0) + 1);
  }
  return [...count.entries()].sort((a, b) => b[1] - a[1])[0]?.[0] ?? "power";
}

export function SessionBuilder({ initial, errors = {}, submitLabel }: { initial: BuilderValues; errors?: Record<string, string | undefined>; submitLabel: string }) {
  const [name, setName] = useState(initial.name);
  const [sport, setSport] = useState(initial.sport);
  const [description, setDescription] = useState(initial.description);
  const [tags, setTags] = useState(initial.tags.join(", "));
  const [items, setItems] = useState<Keyed[]>(() => initial.blocks.map(keyed));
  const [reference, setReference] = useState(250);
  const busy = useNavigation().state === "submitting";
  const blocks = items.map((i) => i.block);

  const clientErrors = useMemo(() => validateBlocks(blocks), [blocks]);
  const allErrors: Record<string, string | undefined> = { ...clientErrors, ...errors };
  const bandSets = useBandSets();
  const bandSet = bandSets[bandSetKeyFor(sport, mainMetric(blocks))];
  // A half-typed field (a duration "abc", an empty percentage) is not a number: figures and the profile wait until
  // every block is valid, so nothing reads "NaN min" and the drawing never gets an impossible size.
  const blocksValid = Object.values(clientErrors).every((v) => !v);
  const estimate = useMemo(() => {
    if (!blocksValid) return null;
    try {
      return estimateSession(blocks, { power: reference > 0 ? reference : undefined }, bandSet.bands);
    } catch {
      return null;
    }
  }, [blocks, reference, bandSet, blocksValid]);
  const profile = useMemo(() => {
    if (!blocksValid) return [];
    try {
      return expandBlocks(blocks).map((s) => ({ s: s.startS, d: s.durationS, lo: s.lowPct, hi: s.highPct, ramp: s.ramp }));
    } catch {
      return [];
    }
  }, [blocks, blocksValid]);

  // The keyboard walks the list by position, not by measured rectangles: the geometric stepper scrolled the page on
  // its own and skipped or repeated positions once the blocks sat below the fold.
  const keyTarget = useRef<{ from: number; to: number; tops: DOMRect[] } | null>(null);
  const liveItems = useRef(items);
  liveItems.current = items;
  const keyboardOptions = useMemo(
    () => ({
      step: (key: StepKey) => {
        const t = keyTarget.current;
        if (!t || (key !== "up" && key !== "down")) return false;
        const to = t.to + (key === "up" ? -1 : 1);
        if (to < 0 || to >= liveItems.current.length) return false;
        t.to = to;
        // Drawn where it will land: top edges line up moving up, bottom edges moving down.
        const a = t.tops[t.from];
        const b = t.tops[to];
        return { x: 0, y: to <= t.from ? b.top - a.top : b.bottom - a.bottom };
      },
    }),
    [],
  );
  const sensors = useSensors(useSensor(PointerSensor, { activationConstraint: { distance: 4 } }), useSensor(StepKeyboardSensor, keyboardOptions));
  const collision: CollisionDetection = (args) => {
    const t = keyTarget.current;
    if (!args.pointerCoordinates && t) return [{ id: liveItems.current[t.to].key }];
    return closestCenter(args);
  };
  const onDragStart = ({ active, activatorEvent }: DragStartEvent) => {
    if (!(activatorEvent instanceof KeyboardEvent)) return;
    const from = items.findIndex((i) => i.key === active.id);
    const tops = [...document.querySelectorAll<HTMLElement>('[data-testid="block"]')].map((el) => el.getBoundingClientRect());
    keyTarget.current = { from, to: from, tops };
  };
  const position = (id: string | number) => items.findIndex((i) => i.key === id) + 1;
  const announcements: Announcements = {
    onDragStart: ({ active }) => `Picked up block ${position(active.id)} of ${items.length}. Use the arrow keys to move it, Space to drop, Escape to cancel.`,
    onDragOver: ({ active, over }) => (over ? `Block ${position(active.id)} is over position ${position(over.id)}.` : `Block ${position(active.id)} is outside the list.`),
    onDragEnd: ({ active, over }) => (over ? `Block dropped at position ${position(over.id)}.` : "Block dropped where it was."),
    onDragCancel: () => "Moving cancelled; the block is back where it was.",
  };
  const onDragEnd = ({ active, over }: DragEndEvent) => {
    keyTarget.current = null;
    if (!over || active.id === over.id) return;
    setItems((list) => arrayMove(list, list.findIndex((i) => i.key === active.id), list.findIndex((i) => i.key === over.id)));
  };

  const update = (key: string, block: Block) => setItems((list) => list.map((i) => (i.key === key ? { key, block } : i)));
  const remove = (key: string) => setItems((list) => list.filter((i) => i.key !== key));
  const duplicate = (key: string) =>
    setItems((list) => {
      const i = list.findIndex((x) => x.key === key);
      return [...list.slice(0, i + 1), keyed(structuredClone(list[i].block)), ...list.slice(i + 1)];
    });
  const move = (key: string, by: -1 | 1) =>
    setItems((list) => {
      const i = list.findIndex((x) => x.key === key);
      const j = i + by;
      return j < 0 || j >= list.length ? list : arrayMove(list, i, j);
    });
  const defaultMetric: Metric = sport === "run" || sport === "swim" ? "pace" : "power";

  const payload = JSON.stringify({
    name,
    sport,
    description,
    tags: tags.split(",").map((t) => t.trim()).filter(Boolean),
    blocks,
  });
  const errorList = Object.entries(allErrors).filter(([, v]) => v) as [string, string][];

  return (
    <Form method="post" className="grid gap-6 lg:grid-cols-[1fr_22rem]">
      <input type="hidden" name="payload" value={payload} />
      <div className="flex flex-col gap-4">
        {errors.form && <FormMessage>{errors.form}</FormMessage>}
        <div className="grid gap-3 rounded-xl border border-line bg-white p-4 sm:grid-cols-2">
          <TextField label="Name" value={name} onChange={setName} error={allErrors.name} required />
          <label className="flex flex-col gap-1 text-sm">
            <span className="font-medium">Sport</span>
            <select value={sport} onChange={(e) => setSport(e.target.value)} className="rounded-lg border border-line bg-white px-3 py-2">
              {SPORTS.map((s) => (
                <option key={s} value={s}>
                  {SPORT_LABEL[s]}
                </option>
              ))}
            </select>
          </label>
          <label className="flex flex-col gap-1 text-sm sm:col-span-2">
            <span className="font-medium">Description</span>
            <textarea value={description} onChange={(e) => setDescription(e.target.value)} rows={2} className="rounded-lg border border-line px-3 py-2" />
          </label>
          <TextField label="Tags (comma-separated)" value={tags} onChange={setTags} error={allErrors.tags} className="sm:col-span-2" />
        </div>

        <section aria-labelledby="blocks-heading" className="flex flex-col gap-3">
          <div className="flex flex-wrap items-center justify-between gap-2">
            <h2 id="blocks-heading" className="text-lg font-semibold">
              Blocks
            </h2>
            <div className="flex flex-wrap gap-1" role="group" aria-label="Add a block">
              {BLOCK_KINDS.map((k) => (
                <button key={k} type="button" className={buttonClass("secondary", "px-2.5 py-1")} onClick={() => setItems((l) => [...l, keyed(newBlock(k, defaultMetric))])}>
                  + {BLOCK_LABEL[k]}
                </button>
              ))}
            </div>
          </div>
          {allErrors.blocks && <p className="text-sm text-brick">{allErrors.blocks}</p>}
          <DndContext
            id="session-blocks"
            sensors={sensors}
            collisionDetection={collision}
            onDragStart={onDragStart}
            onDragEnd={onDragEnd}
            onDragCancel={() => (keyTarget.current = null)}
            accessibility={{ announcements }}
          >
            <SortableContext items={items.map((i) => i.key)} strategy={verticalListSortingStrategy}>
              <ol className="flex flex-col gap-2" aria-label="Blocks of this session">
                {items.map((item, index) => (
                  <SortableBlock
                    key={item.key}
                    id={item.key}
                    index={index}
                    count={items.length}
                    block={item.block}
                    errors={allErrors}
                    onChange={(b) => update(item.key, b)}
                    onRemove={() => remove(item.key)}
                    onDuplicate={() => duplicate(item.key)}
                    onMove={(by) => move(item.key, by)}
                  />
                ))}
              </ol>
            </SortableContext>
          </DndContext>
        </section>
      </div>

      <aside className="flex flex-col gap-4 lg:sticky lg:top-4 lg:self-start" aria-label="Preview and estimates">
        <div className="rounded-xl border border-line bg-white p-4">
          <h2 className="font-semibold">Preview</h2>
          {blocksValid ? (
            <SessionProfile steps={profile} height={80} className="mt-3 rounded bg-paper/60" label="Step profile of this session" />
          ) : (
            <p className="mt-3 flex h-20 items-center justify-center rounded bg-paper/60 px-3 text-center text-sm text-ink-soft">The profile returns once the highlighted fields are fixed.</p>
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
                onChange={(e) => setReference(Number(e.target.value))}
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
              <dd className="text-right font-medium">{estimate.workKj === null ? "—" : `${Math.round(estimate.workKj)} kJ`}</dd>
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
                      style={{ width: `${(m / Math.max(1, estimate.durationS / 60)) * 100}%`, background: bandShade(i, bandSet.bands.length), boxShadow: bandSet.bands[i] && bandAboveThreshold(bandSet.bands[i]) ? "inset 0 0 0 1px var(--color-brick)" : undefined }}
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
        {errorList.length > 0 && (
          <div role="alert" className="rounded-xl border border-brick/40 bg-brick/10 p-3 text-sm text-brick">
            {errorList.length} field{errorList.length === 1 ? " needs" : "s need"} attention before saving.
          </div>
        )}
        <button type="submit" className={buttonClass("primary", "py-2.5")} disabled={busy}>
          {busy ? "Saving…" : submitLabel}
        </button>
      </aside>
    </Form>
  );
}

function TextField({ label, value, onChange, error, className = "", required }: { label: string; value: string; onChange: (v: string) => void; error?: string; className?: string; required?: boolean }) {
  return (
    <label className={`flex flex-col gap-1 text-sm ${className}`}>
      <span className="font-medium">{label}</span>
      <input value={value} onChange={(e) => onChange(e.target.value)} required={required} aria-invalid={error ? true : undefined} className={`rounded-lg border px-3 py-2 ${error ? "border-brick" : "border-line"}`} />
      {error && <span className="text-brick">{error}</span>}
    </label>
  );
}

function SortableBlock(props: {
  id: string;
  index: number;
  count: number;
  block: Block;
  errors: Record<string, string | undefined>;
  onChange: (b: Block) => void;
  onRemove: () => void;
  onDuplicate: () => void;
  onMove: (by: -1 | 1) => void;
}) {
  const { attributes, listeners, setNodeRef, setActivatorNodeRef, transform, transition, isDragging } = useSortable({ id: props.id });
  const { block, index } = props;
  const prefix = `blocks.${index}`;
  const err = (path: string) => props.errors[`${prefix}.${path}`];
  return (
    <li
      ref={setNodeRef}
      style={{ transform: CSS.Transform.toString(transform), transition }}
      className={`rounded-xl border bg-white p-3 shadow-sm ${isDragging ? "z-10 border-teal shadow-lg" : "border-line"}`}
      data-testid="block"
      data-kind={block.kind}
    >
      <div className="flex flex-wrap items-center gap-2">
        <button
          type="button"
          ref={setActivatorNodeRef}
          {...attributes}
          {...listeners}
          // Without touch-action: none a touch or pen drag on the handle scrolls the page instead of moving the block.
          className="cursor-grab touch-none rounded-md border border-line px-2 py-1 text-ink-soft active:cursor-grabbing"
          aria-label={`Move block ${index + 1}, ${BLOCK_LABEL[block.kind]}`}
        >
          ⠿
        </button>
        <span className="font-medium">
          {index + 1}. {BLOCK_LABEL[block.kind]}
        </span>
        <span className="num hidden flex-1 truncate text-sm text-ink-soft sm:block">{Object.keys(props.errors).some((k) => k.startsWith(`${prefix}.`) && props.errors[k]) ? "" : safeDescribe(block)}</span>
        <span className="ml-auto flex gap-1">
          <button type="button" onClick={() => props.onMove(-1)} disabled={index === 0} className={buttonClass("ghost", "px-2 py-1")} aria-label={`Move block ${index + 1} up`}>
            ↑
          </button>
          <button type="button" onClick={() => props.onMove(1)} disabled={index === props.count - 1} className={buttonClass("ghost", "px-2 py-1")} aria-label={`Move block ${index + 1} down`}>
            ↓
          </button>
          <button type="button" onClick={props.onDuplicate} className={buttonClass("ghost", "px-2 py-1")} aria-label={`Duplicate block ${index + 1}`}>
            Copy
          </button>
          <button type="button" onClick={props.onRemove} className={buttonClass("ghost", "px-2 py-1 text-brick")} aria-label={`Delete block ${index + 1}`}>
            Delete
          </button>
        </span>
      </div>
      <div className="mt-3 grid grid-cols-2 gap-3 sm:grid-cols-4">
        <BlockFields block={block} onChange={props.onChange} err={err} label={`Block ${index + 1}`} />
      </div>
    </li>
  );
}

function safeDescribe(b: Block) {
  try {
    return describeBlock(b);
  } catch {
    return "";
  }
}

function BlockFields({ block, onChange, err, label }: { block: Block; onChange: (b: Block) => void; err: (p: string) => string | undefined; label: string }) {
  switch (block.kind) {
    case "warmup":
    case "steady":
    case "cooldown":
      return (
        <>
          <DurationInput label="Duration" aria={`${label} duration`} seconds={block.durationS} onChange={(durationS) => onChange({ ...block, durationS })} error={err("durationS")} />
          <MetricSelect value={block.target.metric} onChange={(metric) => onChange({ ...block, target: { ...block.target, metric } })} aria={`${label} metric`} />
          <PctInput label="Low %" aria={`${label} low percent`} value={block.target.lowPct} onChange={(lowPct) => onChange({ ...block, target: { ...block.target, lowPct: lowPct ?? NaN } })} error={err("target.lowPct")} />
          <PctInput label="High % (optional)" aria={`${label} high percent`} value={block.target.highPct ?? null} optional onChange={(highPct) => onChange({ ...block, target: { ...block.target, highPct } })} error={err("target.highPct")} />
        </>
      );
    case "ramp":
      return (
        <>
          <DurationInput label="Duration" aria={`${label} duration`} seconds={block.durationS} onChange={(durationS) => onChange({ ...block, durationS })} error={err("durationS")} />
          <MetricSelect value={block.metric} onChange={(metric) => onChange({ ...block, metric })} aria={`${label} metric`} />
          <PctInput label="From %" aria={`${label} from percent`} value={block.fromPct} onChange={(fromPct) => onChange({ ...block, fromPct: fromPct ?? NaN })} error={err("fromPct")} />
          <PctInput label="To %" aria={`${label} to percent`} value={block.toPct} onChange={(toPct) => onChange({ ...block, toPct: toPct ?? NaN })} error={err("toPct")} />
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
          <DurationInput label="Work" aria={`${label} work duration`} seconds={block.work.durationS} onChange={(durationS) => onChange({ ...block, work: { ...block.work, durationS } })} error={err("work.durationS")} />
          <PctInput label="Work low %" aria={`${label} work low percent`} value={block.work.target.lowPct} onChange={(lowPct) => onChange({ ...block, work: { ...block.work, target: { ...block.work.target, lowPct: lowPct ?? NaN } } })} error={err("work.target.lowPct")} />
          <PctInput label="Work high %" aria={`${label} work high percent`} optional value={block.work.target.highPct ?? null} onChange={(highPct) => onChange({ ...block, work: { ...block.work, target: { ...block.work.target, highPct } } })} error={err("work.target.highPct")} />
          <MetricSelect value={block.work.target.metric} onChange={(metric) => onChange({ ...block, work: { ...block.work, target: { ...block.work.target, metric } }, recovery: { ...block.recovery, target: block.recovery.target ? { ...block.recovery.target, metric } : null } })} aria={`${label} metric`} />
          <DurationInput label="Recovery" aria={`${label} recovery duration`} seconds={block.recovery.durationS} onChange={(durationS) => onChange({ ...block, recovery: { ...block.recovery, durationS } })} error={err("recovery.durationS")} />
          <PctInput
            label="Recovery % (optional)"
            aria={`${label} recovery percent`}
            optional
            value={block.recovery.target?.lowPct ?? null}
            onChange={(lowPct) => onChange({ ...block, recovery: { ...block.recovery, target: lowPct === null ? null : { metric: block.work.target.metric, lowPct } } })}
            error={err("recovery.target.lowPct")}
          />
        </>
      );
    case "open":
      return (
        <>
          <DurationInput label="Duration" aria={`${label} duration`} seconds={block.durationS} onChange={(durationS) => onChange({ ...block, durationS })} error={err("durationS")} />
          <label className="col-span-1 flex flex-col gap-1 text-sm sm:col-span-3">
            <span className="font-medium">Cue</span>
            <input value={block.cue ?? ""} onChange={(e) => onChange({ ...block, cue: e.target.value })} maxLength={200} className="rounded-lg border border-line px-2 py-1.5" aria-label={`${label} cue`} />
          </label>
        </>
      );
  }
}

function DurationInput({ label, aria, seconds, onChange, error }: { label: string; aria: string; seconds: number; onChange: (s: number) => void; error?: string }) {
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
      {message ? <span className="text-xs text-brick">{message}</span> : <span className="text-xs text-ink-soft">{Number.isFinite(seconds) ? formatMinutes(seconds) : ""}</span>}
    </label>
  );
}

function PctInput({ label, aria, value, onChange, error, optional }: { label: string; aria: string; value: number | null; onChange: (v: number | null) => void; error?: string; optional?: boolean }) {
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
      <select value={value} onChange={(e) => onChange(e.target.value as Metric)} aria-label={aria} className="rounded-lg border border-line bg-white px-2 py-1.5">
        {METRICS.map(([m, l]) => (
          <option key={m} value={m}>
            {l}
          </option>
        ))}
      </select>
    </label>
  );
}
