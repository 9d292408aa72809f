import { useDroppable } from "@dnd-kit/core";
import { useState } from "react";
import { BoardCard } from "~/components/board/board-card";
import { describeDay, type DropTarget, slotId } from "~/components/board/drop-target";
import { RISE_CAP } from "~/components/board/week-stats";
import type { BoardItem, BoardWeek } from "~/lib/board";
import { addDays, formatDay } from "~/lib/dates";
import { formatMinutes } from "~/lib/duration";
import { DAY_NAMES, PHASE_LABEL } from "~/lib/plan-labels";
import { bandShade } from "~/lib/training";

export function WeekColumn(props: {
  week: BoardWeek;
  weeks: BoardWeek[];
  /** Whether the page is live: before then the target-week list holds only its chosen week (it does nothing yet). */
  live: boolean;
  startDate: string | null;
  load: number;
  maxLoad: number;
  seconds: number;
  levels: number[];
  warn: boolean;
  rise: number;
  items: BoardItem[];
  selected: number | null;
  onSelect: (id: number) => void;
  drop: DropTarget | null;
  dropName: string;
  movingId: number | null;
  onWeekOp: (op: "duplicate-week" | "move-week", toWeek: number) => void;
}) {
  const { week, startDate } = props;
  const monday = startDate ? addDays(startDate, (week.idx - 1) * 7) : null;
  const [target, setTarget] = useState<number>(props.weeks.find((w) => w.id !== week.id)?.id ?? week.id);
  const totalLevels = props.levels.reduce((a, b) => a + b, 0) || 1;
  return (
    <section className="bw-week flex h-full flex-col" aria-label={`Week ${week.idx}`}>
      <div
        className="h-2"
        style={{
          background: `var(--color-phase-${week.phase})`,
          opacity: week.recovery ? 0.45 : 1,
        }}
      />
      <header className="border-b border-line px-2.5 py-2 text-xs">
        <div className="flex items-baseline justify-between">
          <h3 className="text-sm font-semibold">Week {week.idx}</h3>
          <span className="text-ink-soft">{PHASE_LABEL[week.phase as keyof typeof PHASE_LABEL] ?? week.phase}</span>
        </div>
        <p className="num text-ink-soft">
          {monday
            ? `${formatDay(monday, { day: "numeric", month: "short" })} – ${formatDay(addDays(monday, 6), { day: "numeric", month: "short" })}`
            : `Week ${week.idx} of the plan`}
        </p>
        <div className="mt-1 flex flex-wrap gap-1">
          {week.recovery && <span className="rounded bg-phase-recovery/30 px-1">recovery</span>}
          {week.test && <span className="rounded bg-brick/15 px-1 text-brick">test week</span>}
        </div>
        <p className="num mt-1">
          {props.seconds ? formatMinutes(props.seconds) : "0 min"} of {week.plannedHours} h planned
        </p>
        <div
          className="mt-1 h-1.5 rounded bg-paper-deep"
          title={`Planned effort load ${Math.round(props.load)} points (effort score × minutes)`}
        >
          <div
            className={`h-1.5 rounded ${props.warn ? "bg-brick" : "bg-teal"}`}
            style={{ width: `${(props.load / props.maxLoad) * 100}%` }}
          />
        </div>
        <div className="mt-1 flex h-1.5 overflow-hidden rounded" aria-label="Minutes per band">
          {props.levels.map((m, i) =>
            m > 0 ? (
              <span
                key={i}
                style={{
                  width: `${(m / totalLevels) * 100}%`,
                  background: bandShade(i, props.levels.length),
                }}
              />
            ) : null,
          )}
        </div>
        {props.warn && (
          <p role="note" className="mt-1 font-medium text-brick">
            Load up {Math.round(props.rise * 100)} % on the last loading week (cap {RISE_CAP * 100} %).
          </p>
        )}
      </header>
      <div className="flex flex-1 flex-col divide-y divide-line/70">
        {DAY_NAMES.map((d, day) => (
          <DaySlot
            key={day}
            weekId={week.id}
            day={day}
            label={d}
            weekIdx={week.idx}
            date={monday ? addDays(monday, day) : null}
            startDate={startDate}
            items={props.items.filter((i) => i.day === day).sort((a, b) => a.position - b.position)}
            selected={props.selected}
            onSelect={props.onSelect}
            dropIndex={props.drop && props.drop.day === day ? props.drop.index : null}
            dropName={props.dropName}
            movingId={props.movingId}
          />
        ))}
      </div>
      <footer className="flex flex-wrap items-center gap-1 border-t border-line p-2 text-xs">
        <label className="sr-only" htmlFor={`week-target-${week.id}`}>
          Target week for week {week.idx}
        </label>
        <select
          id={`week-target-${week.id}`}
          value={target}
          onChange={(e) => setTarget(Number(e.target.value))}
          className="rounded border border-line px-1 py-0.5"
        >
          {props.weeks
            .filter((w) => w.id !== week.id && (props.live || w.id === target))
            .map((w) => (
              <option key={w.id} value={w.id}>
                to week {w.idx}
              </option>
            ))}
        </select>
        <button
          type="button"
          aria-label={`Copy week ${week.idx}'s sessions to the chosen week`}
          className="bw-op"
          onClick={() => props.onWeekOp("duplicate-week", target)}
        >
          Copy
        </button>
        <button
          type="button"
          aria-label={`Move week ${week.idx}'s sessions to the chosen week`}
          className="bw-op"
          onClick={() => props.onWeekOp("move-week", target)}
        >
          Move
        </button>
      </footer>
    </section>
  );
}

function DaySlot(props: {
  weekId: number;
  day: number;
  label: string;
  weekIdx: number;
  date: string | null;
  startDate: string | null;
  items: BoardItem[];
  selected: number | null;
  onSelect: (id: number) => void;
  dropIndex: number | null;
  dropName: string;
  movingId: number | null;
}) {
  const { weekId, day, label, weekIdx, items, dropIndex } = props;
  const { setNodeRef } = useDroppable({ id: slotId(weekId, day) });
  const others = items.filter((i) => i.id !== props.movingId);
  // The marker takes no room: a drop indicator that pushed the days below it down moved the day under the pointer,
  // so a drop aimed at Sunday stayed on a grown Saturday.
  const at = dropIndex === null ? -1 : Math.min(dropIndex, others.length);
  const marker = (
    <li
      key="drop-marker"
      aria-hidden="true"
      data-testid="drop-marker"
      className={`relative h-0 ${others.length === 0 ? "" : at === 0 ? "-mb-1" : "-mt-1"}`}
    >
      <span
        className={`pointer-events-none absolute inset-x-0 h-1 rounded-full bg-teal ${others.length === 0 ? "top-0.5" : at === 0 ? "-top-0.5" : "top-0"}`}
      />
    </li>
  );
  const cards = others.map((i) => (
    <li key={i.id}>
      <BoardCard item={i} selected={props.selected === i.id} onSelect={() => props.onSelect(i.id)} />
    </li>
  ));
  if (at >= 0) cards.splice(at, 0, marker);
  const moving = items.find((i) => i.id === props.movingId);
  return (
    <div
      ref={setNodeRef}
      className={`bw-day${dropIndex !== null ? " bg-teal/10 outline-2 -outline-offset-2 outline-teal" : ""}`}
      data-testid={`slot-${weekIdx}-${day}`}
      data-drop-slot={slotId(weekId, day)}
      aria-label={describeDay(weekIdx, day, props.startDate)}
      role="group"
    >
      <span className="bw-day-label">
        {label}
        {props.date && (
          <span className="num ml-1 normal-case">{formatDay(props.date, { day: "numeric", month: "short" })}</span>
        )}
      </span>
      {dropIndex !== null && (
        <span
          aria-hidden="true"
          className="pointer-events-none absolute top-0.5 right-1 max-w-[70%] truncate rounded bg-teal px-1 text-[10px] font-medium text-white"
        >
          {props.dropName || "Session"} here
        </span>
      )}
      {(cards.length > 0 || moving) && (
        <ul className="flex flex-col gap-1">
          {cards}
          {/* The card being moved stays mounted (dnd-kit holds its node) but out of the flow while it is carried. */}
          {moving && (
            <li className="hidden">
              <BoardCard item={moving} selected={false} onSelect={() => props.onSelect(moving.id)} />
            </li>
          )}
        </ul>
      )}
    </div>
  );
}
