// Over 300 lines on purpose: the grid, its day cells and chips share one drag (dnd-kit context, keyboard stepping,
// announcements, the pending move) and are used nowhere else; apart, that state would be threaded through props.
import {
  type CollisionDetection,
  DndContext,
  PointerSensor,
  useDraggable,
  useDroppable,
  useSensor,
  useSensors,
  type Announcements,
  type DragEndEvent,
  type DragStartEvent,
} from "@dnd-kit/core";
import { useMemo, useRef, useState } from "react";
import { StepKeyboardSensor, type StepKey } from "~/components/board/step-keyboard-sensor";
import { Link, useFetcher, useNavigation } from "react-router";
import { addDays, formatDay } from "~/lib/dates";
import { formatMinutes } from "~/lib/duration";
import { buttonClass } from "~/components/ui/button";
import type { CalendarEntry } from "~/lib/calendar-entry";

const WEEKS_SHOWN = 2;

/**
 * Two weeks of an athlete's calendar. The weeks shown are the page's `?from=` (read by its loader), so Earlier and
 * Later are links; a session can be dragged (or picked up with Space and moved with the arrow keys) to another day.
 * The move is shown at once from the pending submission and the loaders' revalidation brings the saved state.
 */
export function WeekCalendar({
  athleteId,
  from,
  today,
  sessions: saved,
  sessionHref,
}: {
  athleteId?: number;
  from: string;
  today: string;
  sessions: CalendarEntry[];
  sessionHref: (id: number) => string;
}) {
  const [message, setMessage] = useState<{ tone: "ok" | "error"; text: string } | null>(null);
  const move = useFetcher<{ ok?: boolean; error?: string }>();
  const navigation = useNavigation();
  const days = Array.from({ length: WEEKS_SHOWN * 7 }, (_, i) => addDays(from, i));
  const to = days.at(-1)!;
  const pending = move.state !== "idle" ? (move.json as { sessionId: number; date: string } | undefined) : undefined;
  const sessions = pending ? saved.map((x) => (x.id === pending.sessionId ? { ...x, date: pending.date } : x)) : saved;
  const failed = move.state === "idle" ? move.data?.error : undefined;
  const notice = failed ? { tone: "error" as const, text: failed } : message;
  const weeksLink = (weeks: number) => `?from=${addDays(from, weeks * 7)}`;

  // Keyboard moves go by the calendar itself (up/down a day, left/right a week) and the pointer by the day under it,
  // read from the page, so neither depends on rectangles measured before the page scrolled.
  const keyDay = useRef<string | null>(null);
  const keyboardOptions = useMemo(
    () => ({
      step: (key: StepKey) => {
        if (!keyDay.current) return false;
        const next = addDays(keyDay.current, key === "up" ? -1 : key === "down" ? 1 : key === "left" ? -7 : 7);
        // Only the days on screen are targets: from `from` to the last day shown.
        if (next < from || next > addDays(from, WEEKS_SHOWN * 7 - 1)) return false;
        keyDay.current = next;
        requestAnimationFrame(() =>
          document.querySelector(`[data-testid="day-${next}"]`)?.scrollIntoView({ block: "nearest" }),
        );
        return true;
      },
    }),
    [from],
  );
  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 6 } }),
    useSensor(StepKeyboardSensor, keyboardOptions),
  );
  const collision: CollisionDetection = ({ pointerCoordinates }) => {
    if (pointerCoordinates) {
      const el = document
        .elementFromPoint(pointerCoordinates.x, pointerCoordinates.y)
        ?.closest<HTMLElement>("[data-day]");
      return el ? [{ id: `day:${el.dataset.day}` }] : [];
    }
    return keyDay.current ? [{ id: `day:${keyDay.current}` }] : [];
  };
  const onDragStart = ({ active, activatorEvent }: DragStartEvent) => {
    keyDay.current =
      activatorEvent instanceof KeyboardEvent
        ? (sessions.find((x) => `session:${x.id}` === active.id)?.date ?? null)
        : null;
  };
  const nameOf = (id: unknown) => sessions.find((s) => `session:${s.id}` === id)?.name ?? "session";
  const announcements: Announcements = {
    onDragStart: ({ active }) =>
      `Picked up ${nameOf(active.id)}. Up and down arrows move it a day, left and right a week; Space drops it; Escape cancels.`,
    onDragOver: ({ active, over }) =>
      `${nameOf(active.id)} is over ${over ? formatDay(String(over.id).slice(4), { weekday: "long", day: "numeric", month: "long" }) : "no day"}.`,
    onDragEnd: ({ active, over }) =>
      over
        ? `${nameOf(active.id)} moved to ${formatDay(String(over.id).slice(4), { weekday: "long", day: "numeric", month: "long" })}.`
        : `${nameOf(active.id)} was not moved.`,
    onDragCancel: ({ active }) => `Cancelled; ${nameOf(active.id)} stays on its day.`,
  };
  const onDragEnd = ({ active, over }: DragEndEvent) => {
    if (!over) return;
    const id = Number(String(active.id).slice(8));
    const date = String(over.id).slice(4);
    const s = sessions.find((x) => x.id === id);
    if (!s || s.date === date) return;
    setMessage({ tone: "ok", text: `Moved ${s.name} to ${formatDay(date)}.` });
    move.submit(
      { sessionId: id, date },
      {
        method: "post",
        action: `/api/calendar${athleteId ? `?athleteId=${athleteId}` : ""}`,
        encType: "application/json",
      },
    );
  };

  return (
    <section aria-label="Calendar">
      <div className="mb-3 flex flex-wrap items-center gap-2">
        <Link
          to={weeksLink(-WEEKS_SHOWN)}
          preventScrollReset
          className={buttonClass("secondary", "px-3 py-1")}
          aria-label="Earlier weeks"
        >
          ← Earlier
        </Link>
        <Link
          to={weeksLink(WEEKS_SHOWN)}
          preventScrollReset
          className={buttonClass("secondary", "px-3 py-1")}
          aria-label="Later weeks"
        >
          Later →
        </Link>
        <h2 className="num text-lg font-semibold" aria-live="polite">
          {formatDay(from, { day: "numeric", month: "short" })} –{" "}
          {formatDay(to, { day: "numeric", month: "short", year: "numeric" })}
        </h2>
        {navigation.state === "loading" && navigation.location.search.includes("from=") && (
          <span className="text-sm text-ink-soft">Loading…</span>
        )}
      </div>
      {notice && (
        <p
          role={notice.tone === "error" ? "alert" : "status"}
          className={`mb-2 rounded-lg px-3 py-2 text-sm ${notice.tone === "error" ? "bg-brick/10 text-brick" : "bg-teal/10 text-teal-dark"}`}
        >
          {notice.text}
        </p>
      )}
      <DndContext
        id="athlete-calendar"
        sensors={sensors}
        collisionDetection={collision}
        onDragStart={onDragStart}
        onDragEnd={(e) => {
          keyDay.current = null;
          onDragEnd(e);
        }}
        onDragCancel={() => (keyDay.current = null)}
        accessibility={{ announcements }}
      >
        <ol className="grid grid-cols-1 gap-2 sm:grid-cols-7">
          {days.map((d, i) => (
            <Day
              key={d}
              date={d}
              today={today}
              weekStart={i % 7 === 0}
              sessions={sessions.filter((s) => s.date === d).sort((a, b) => a.position - b.position)}
              sessionHref={sessionHref}
            />
          ))}
        </ol>
      </DndContext>
    </section>
  );
}

function Day({
  date,
  today,
  weekStart,
  sessions,
  sessionHref,
}: {
  date: string;
  today: string;
  weekStart: boolean;
  sessions: CalendarEntry[];
  sessionHref: (id: number) => string;
}) {
  const { setNodeRef, isOver } = useDroppable({ id: `day:${date}` });
  const isToday = date === today;
  return (
    <>
      {/* The phone's day list is split into weeks; on wider screens each row of seven is a week already. */}
      {weekStart && (
        <li aria-hidden="true" className="mt-2 text-sm font-semibold first:mt-0 sm:hidden">
          Week of {formatDay(date, { day: "numeric", month: "long" })}
        </li>
      )}
      <DayCell
        refFn={setNodeRef}
        isOver={isOver}
        isToday={isToday}
        date={date}
        today={today}
        sessions={sessions}
        sessionHref={sessionHref}
      />
    </>
  );
}

function DayCell({
  refFn,
  isOver,
  isToday,
  date,
  today,
  sessions,
  sessionHref,
}: {
  refFn: (el: HTMLElement | null) => void;
  isOver: boolean;
  isToday: boolean;
  date: string;
  today: string;
  sessions: CalendarEntry[];
  sessionHref: (id: number) => string;
}) {
  return (
    <li
      ref={refFn}
      data-day={date}
      className={`min-h-10 rounded-xl border p-2 sm:min-h-24 ${isOver ? "border-teal bg-teal/10 outline-2 -outline-offset-2 outline-teal" : isToday ? "border-brick bg-white" : "border-line bg-white"} ${date < today ? "opacity-80" : ""}`}
      data-testid={`day-${date}`}
    >
      <p className={`num text-xs font-medium ${isToday ? "text-brick" : "text-ink-soft"}`}>
        {formatDay(date)} {isToday && "· today"}
      </p>
      <ul className="mt-1 flex flex-col gap-1.5">
        {sessions.map((s) => (
          <li key={s.id}>
            <SessionChip session={s} href={sessionHref(s.id)} />
          </li>
        ))}
      </ul>
    </li>
  );
}

function SessionChip({ session: s, href }: { session: CalendarEntry; href: string }) {
  const { attributes, listeners, setNodeRef, transform, isDragging } = useDraggable({
    id: `session:${s.id}`,
    disabled: s.status !== "planned",
  });
  const tone =
    s.status === "done"
      ? "border-teal bg-teal/10"
      : s.status === "skipped"
        ? "border-line bg-paper-deep line-through"
        : s.testProtocol
          ? "border-brick/50 bg-brick/5"
          : "border-line bg-paper/60";
  return (
    <div
      ref={setNodeRef}
      style={transform ? { transform: `translate3d(${transform.x}px, ${transform.y}px, 0)` } : undefined}
      className={`rounded-lg border p-1.5 text-xs ${tone} ${isDragging ? "z-10 shadow-lg" : ""}`}
      data-testid="calendar-session"
    >
      <div className="flex items-start gap-1">
        {s.status === "planned" && (
          <button
            type="button"
            {...attributes}
            {...listeners}
            className="cursor-grab touch-none rounded px-0.5 text-ink-soft"
            aria-label={`Move ${s.name}`}
          >
            ⠿
          </button>
        )}
        <Link to={href} className="flex-1 font-medium leading-tight hover:underline">
          {s.timeOfDay && <span className="num mr-1 text-ink-soft">{s.timeOfDay}</span>}
          {s.name}
        </Link>
      </div>
      <p className="num mt-0.5 text-ink-soft">{formatMinutes(s.plannedDurationS)}</p>
      {s.keyTarget && <p className="num mt-0.5 font-medium text-teal-dark">{s.keyTarget}</p>}
      {s.needsTest && <p className="mt-0.5 text-brick">needs a field test</p>}
      {s.status !== "planned" && (
        <p className="mt-0.5">
          {s.status === "done" ? `done${s.effortScore !== null ? ` · effort ${s.effortScore}` : ""}` : "skipped"}
        </p>
      )}
    </div>
  );
}
