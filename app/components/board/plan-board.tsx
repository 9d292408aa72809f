import {
  DndContext,
  type CollisionDetection,
  DragOverlay,
  PointerSensor,
  useDraggable,
  useDroppable,
  useSensor,
  useSensors,
  type Announcements,
  type DragEndEvent,
  type DragStartEvent,
  type UniqueIdentifier,
} from "@dnd-kit/core";
import {
  describeDay,
  describeTarget,
  type DropTarget,
  sameTarget,
  slotId,
  slotItems,
  stepTarget,
  targetAtPoint,
} from "~/components/board/drop-target";
import { StepKeyboardSensor, type StepKey } from "~/components/board/step-keyboard-sensor";
import { useEffect, useMemo, useRef, useState, useSyncExternalStore } from "react";
import { useFetcher, useRevalidator } from "react-router";
import { ProfileMarks, SessionProfile, type ProfileStep } from "~/components/session-profile";
import { buttonClass } from "~/components/ui/button";
import { boardItems, boardView, type BoardCard, type BoardItem, type BoardShape, type BoardWeek } from "~/lib/board";
import { addDays, formatDay } from "~/lib/dates";
import { formatMinutes } from "~/lib/duration";
import { DAY_NAMES, PHASE_LABEL } from "~/lib/plan-labels";
import { describeBlock } from "~/lib/session-text";
import { useBandSet } from "~/components/bands-context";
import { bandShade, type Block } from "~/lib/training";

export type { BoardItem, BoardWeek };
export interface BoardData {
  plan: { id: number; name: string; startDate: string | null; version: number };
  weeks: BoardWeek[];
  cards: BoardCard[];
  shapes: BoardShape[];
}
interface ShelfEntry {
  id: number;
  name: string;
  sport: string;
  durationS: number;
  profile: {
    s: number;
    d: number;
    lo: number | null;
    hi: number | null;
    ramp: boolean;
  }[];
  tags: string[];
}
type Op =
  | {
      op: "copy";
      sessionId: number;
      toWeek: number;
      toDay: number;
      toIndex: number;
    }
  | {
      op: "move";
      itemId: number;
      toWeek: number;
      toDay: number;
      toIndex: number;
    }
  | { op: "remove"; itemId: number }
  | { op: "duplicate-week" | "move-week"; fromWeek: number; toWeek: number }
  | { op: "time"; itemId: number; timeOfDay: string | null }
  | { op: "note"; itemId: number; notes: string };
/** The JSON route answers with the plan's items in full; the board turns them into its cards and shapes. */
type ServerReply = { version: number; items: Parameters<typeof boardView>[0] } | { error: string; version?: number };
type Drawn = { items: BoardItem[]; shapes: BoardShape[] };

/**
 * Weeks drawn by the server: the ones a wide screen shows without scrolling, and more. The rest follow as soon as
 * the page is live, so a year-long plan does not ship its whole board as HTML (nothing on it works before then).
 */
const SERVER_WEEKS = 4;
const noSubscribe = () => () => {};
/** False while the server renders and the browser hydrates; true from then on (and at once after client navigation). */
const useHydrated = () =>
  useSyncExternalStore(
    noSubscribe,
    () => true,
    () => false,
  );

/** Rise of planned load over the previous non-recovery week above which a week is flagged (common practice). */
const RISE_CAP = 0.1;

const itemKey = (id: number) => `item:${id}`;

/** Applies a change to the local items at once (optimistic); the server's answer then replaces them. */
function applyLocal(items: BoardItem[], op: Op, shelf: ShelfEntry[], tempId: number): BoardItem[] {
  const slot = (w: number, d: number, list: BoardItem[]) =>
    list.filter((i) => i.weekId === w && i.day === d).sort((a, b) => a.position - b.position);
  const renumber = (list: BoardItem[], w: number, d: number, order: BoardItem[]) => {
    const ids = order.map((i) => i.id);
    return list.map((i) =>
      i.weekId === w && i.day === d && ids.includes(i.id) ? { ...i, position: ids.indexOf(i.id) } : i,
    );
  };
  if (op.op === "move" || op.op === "copy") {
    let moving: BoardItem;
    let rest = items;
    if (op.op === "move") {
      moving = items.find((i) => i.id === op.itemId)!;
      rest = items.filter((i) => i.id !== op.itemId);
      rest = renumber(rest, moving.weekId, moving.day, slot(moving.weekId, moving.day, rest));
    } else {
      const s = shelf.find((x) => x.id === op.sessionId)!;
      moving = {
        id: tempId,
        weekId: op.toWeek,
        day: op.toDay,
        position: 0,
        name: s.name,
        durationS: s.durationS,
        shape: -1,
        test: false,
        timeOfDay: null,
        notes: "",
      };
    }
    const target = slot(op.toWeek, op.toDay, rest);
    const placed = { ...moving, weekId: op.toWeek, day: op.toDay };
    target.splice(Math.min(op.toIndex, target.length), 0, placed);
    return renumber(
      [...rest.filter((i) => !(i.weekId === op.toWeek && i.day === op.toDay)), ...target],
      op.toWeek,
      op.toDay,
      target,
    );
  }
  if (op.op === "remove") return items.filter((i) => i.id !== op.itemId);
  if (op.op === "time") return items.map((i) => (i.id === op.itemId ? { ...i, timeOfDay: op.timeOfDay } : i));
  if (op.op === "note") return items.map((i) => (i.id === op.itemId ? { ...i, notes: op.notes } : i));
  return items;
}

export function PlanBoard({ data }: { data: BoardData }) {
  const { plan, weeks } = data;
  const hydrated = useHydrated();
  const shipped = useMemo(() => boardItems(data.cards, data.shapes), [data.cards, data.shapes]);
  const [items, setItems] = useState<BoardItem[]>(shipped);
  const [shapes, setShapes] = useState<BoardShape[]>(data.shapes);
  const [version, setVersion] = useState(plan.version);
  const [selected, setSelected] = useState<number | null>(null);
  const [message, setMessage] = useState<{
    tone: "ok" | "error";
    text: string;
  } | null>(null);
  const [activeId, setActiveId] = useState<UniqueIdentifier | null>(null);
  const fetcher = useFetcher<ServerReply>();
  const revalidator = useRevalidator();
  const queue = useRef<Op[]>([]);
  const confirmed = useRef<Drawn>({ items: shipped, shapes: data.shapes });
  const tempIds = useRef(-1);

  // A reload (after a 409, or navigation back) brings fresh server data: adopt it while rendering, as React advises
  // for state that follows a prop, so no frame shows the old board.
  const [adopted, setAdopted] = useState({ shipped, shapes: data.shapes, version: data.plan.version });
  if (adopted.shipped !== shipped || adopted.shapes !== data.shapes || adopted.version !== data.plan.version) {
    setAdopted({ shipped, shapes: data.shapes, version: data.plan.version });
    setItems(shipped);
    setShapes(data.shapes);
    setVersion(data.plan.version);
  }
  useEffect(() => {
    confirmed.current = { items: shipped, shapes: data.shapes };
  }, [shipped, data.shapes]);
  const powerBands = useBandSet("bike:power").bands;

  const shelfFetcher = useFetcher<{ sessions: ShelfEntry[] }>();
  const [q, setQ] = useState("");
  useEffect(() => {
    const t = setTimeout(() => shelfFetcher.load(`/api/sessions?q=${encodeURIComponent(q)}`), q ? 200 : 0);
    return () => clearTimeout(t);
  }, [q]); // eslint-disable-line react-hooks/exhaustive-deps
  const shelf = shelfFetcher.data?.sessions ?? [];

  const send = (op: Op, v: number) =>
    fetcher.submit(
      { ...op, version: v },
      {
        method: "post",
        action: `/api/plans/${plan.id}/items`,
        encType: "application/json",
      },
    );

  // Changes go to the server one at a time, each with the version the previous answer gave.
  useEffect(() => {
    if (fetcher.state !== "idle" || !fetcher.data) return;
    const reply = fetcher.data;
    if ("error" in reply) {
      queue.current = [];
      setItems(confirmed.current.items);
      setShapes(confirmed.current.shapes);
      setMessage({ tone: "error", text: reply.error });
      if (reply.version !== undefined) revalidator.revalidate();
    } else {
      const view = boardView(reply.items, powerBands);
      confirmed.current = {
        items: boardItems(view.cards, view.shapes),
        shapes: view.shapes,
      };
      setVersion(reply.version);
      const next = queue.current.shift();
      if (next) send(next, reply.version);
      else {
        setItems(confirmed.current.items);
        setShapes(confirmed.current.shapes);
      }
    }
  }, [fetcher.state, fetcher.data]); // eslint-disable-line react-hooks/exhaustive-deps

  const change = (op: Op, announce?: string) => {
    setMessage(announce ? { tone: "ok", text: announce } : null);
    setItems((list) => applyLocal(list, op, shelf, tempIds.current--));
    if (fetcher.state === "idle" && queue.current.length === 0) send(op, version);
    else queue.current.push(op);
  };

  const weekById = useMemo(() => new Map(weeks.map((w) => [w.id, w])), [weeks]);
  const nameOf = (id: UniqueIdentifier) => {
    const s = String(id);
    if (s.startsWith("shelf:")) return shelf.find((x) => x.id === Number(s.slice(6)))?.name ?? "session";
    return items.find((i) => i.id === Number(s.slice(5)))?.name ?? "session";
  };
  const movingItemId = (id: UniqueIdentifier | null | undefined) =>
    id && String(id).startsWith("item:") ? Number(String(id).slice(5)) : null;

  // The drop target lives in refs for dnd-kit's callbacks (which run outside React's render cycle) and in state
  // for the indicator drawn on the board.
  const [drop, setDrop] = useState<DropTarget | null>(null);
  // A keyboard move shows no floating copy; the pointer's does. Kept as state because the overlay is drawn from it.
  const [keyboardDrag, setKeyboardDrag] = useState(false);
  const mode = useRef<"pointer" | "keyboard" | null>(null);
  const target = useRef<DropTarget | null>(null);
  const moving = useRef<number | null>(null);
  const spoken = useRef("");
  const finalWords = useRef("");
  const focusAfter = useRef<number | null>(null);
  // dnd-kit's keyboard callbacks run between renders; they read the board as last drawn.
  const live = useRef({ items, weeks, startDate: plan.startDate });
  useEffect(() => {
    live.current = { items, weeks, startDate: plan.startDate };
  }, [items, weeks, plan.startDate]);
  const describe = (t: DropTarget | null) => {
    const w = t ? weekById.get(t.weekId) : undefined;
    return t && w ? describeTarget(t, w.idx, plan.startDate, items, moving.current) : "no day";
  };

  const setTarget = (t: DropTarget | null) => {
    target.current = t;
    setDrop((old) => (sameTarget(old, t) ? old : t));
  };
  const step = (key: StepKey) => {
    const now = target.current;
    if (!now) return false;
    const { weeks: ws, items: its } = live.current;
    const next = stepTarget(
      now,
      key,
      ws.map((w) => w.id),
      its,
      moving.current,
    );
    if (!next) return false;
    setTarget(next);
    requestAnimationFrame(() =>
      document
        .querySelector(`[data-drop-slot="${slotId(next.weekId, next.day)}"]`)
        ?.scrollIntoView({ block: "nearest", inline: "nearest" }),
    );
    return true;
  };
  const stepRef = useRef(step);
  useEffect(() => {
    stepRef.current = step;
  });
  const keyboardOptions = useMemo(() => ({ step: (k: StepKey) => stepRef.current(k) }), []);
  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 5 } }),
    useSensor(StepKeyboardSensor, keyboardOptions),
  );

  const collision: CollisionDetection = ({ pointerCoordinates }) => {
    if (pointerCoordinates) target.current = targetAtPoint(pointerCoordinates.x, pointerCoordinates.y, moving.current);
    const t = target.current;
    return t ? [{ id: slotId(t.weekId, t.day) }] : [];
  };

  const lastShelfDrop = useRef<DropTarget | null>(null);
  const announcements: Announcements = {
    onDragStart: ({ active }) =>
      mode.current === "keyboard"
        ? `Picked up ${nameOf(active.id)}, now over ${describe(target.current)}. Up and down arrows move it through the days, left and right to the same day of another week; Space drops it, Escape cancels.`
        : `Picked up ${nameOf(active.id)}.`,
    onDragMove: ({ active }) => {
      const words = `${nameOf(active.id)} is over ${describe(target.current)}.`;
      if (words === spoken.current) return undefined;
      spoken.current = words;
      return words;
    },
    onDragOver: () => undefined,
    onDragEnd: () => finalWords.current,
    onDragCancel: ({ active }) => `Cancelled. ${nameOf(active.id)} stays where it was.`,
  };

  const onDragStart = (e: DragStartEvent) => {
    focusAfter.current = null;
    setActiveId(e.active.id);
    mode.current = e.activatorEvent instanceof KeyboardEvent ? "keyboard" : "pointer";
    setKeyboardDrag(mode.current === "keyboard");
    moving.current = movingItemId(e.active.id);
    spoken.current = "";
    if (mode.current === "keyboard") {
      const it = moving.current !== null ? items.find((i) => i.id === moving.current) : undefined;
      const first = weeks[0];
      const start: DropTarget | null = it
        ? {
            weekId: it.weekId,
            day: it.day,
            index: slotItems(items, it.weekId, it.day, it.id).filter((o) => o.position < it.position).length,
          }
        : lastShelfDrop.current && weekById.has(lastShelfDrop.current.weekId)
          ? {
              ...lastShelfDrop.current,
              index: slotItems(items, lastShelfDrop.current.weekId, lastShelfDrop.current.day, null).length,
            }
          : first
            ? {
                weekId: first.id,
                day: 0,
                index: slotItems(items, first.id, 0, null).length,
              }
            : null;
      setTarget(start);
    } else setTarget(null);
  };
  const finish = () => {
    setActiveId(null);
    setDrop(null);
    target.current = null;
    mode.current = null;
    setKeyboardDrag(false);
  };
  const onDragEnd = ({ active, over }: DragEndEvent) => {
    const t = target.current;
    const viaKeyboard = mode.current === "keyboard";
    const activeItemId = moving.current;
    finish();
    const name = nameOf(active.id);
    if (!over || !t) {
      finalWords.current = `${name} was not placed.`;
      return;
    }
    const where = describeDay(weekById.get(t.weekId)?.idx ?? 0, t.day, plan.startDate);
    finalWords.current = `${name} placed on ${describeTarget(t, weekById.get(t.weekId)?.idx ?? 0, plan.startDate, items, activeItemId)}.`;
    if (String(active.id).startsWith("shelf:")) {
      const sessionId = Number(String(active.id).slice(6));
      if (viaKeyboard) lastShelfDrop.current = t;
      change(
        {
          op: "copy",
          sessionId,
          toWeek: t.weekId,
          toDay: t.day,
          toIndex: t.index,
        },
        `Added ${name} on ${where}.`,
      );
    } else if (activeItemId !== null) {
      const it = items.find((i) => i.id === activeItemId)!;
      const sameSlot = it.weekId === t.weekId && it.day === t.day;
      if (
        sameSlot &&
        slotItems(items, t.weekId, t.day, it.id).filter((o) => o.position < it.position).length === t.index
      )
        return;
      if (viaKeyboard) focusAfter.current = activeItemId;
      change(
        {
          op: "move",
          itemId: activeItemId,
          toWeek: t.weekId,
          toDay: t.day,
          toIndex: t.index,
        },
        `Moved ${it.name} to ${where}.`,
      );
    }
  };
  const onDragCancel = () => {
    finish();
  };
  // A card moved by keyboard is drawn anew in its new day, and again when the server's answer replaces the optimistic
  // board; each time the focus would fall to the page, give it back to the card so the next move can start there.
  // The wish lasts until the next drag, and never takes the focus from anything the user has moved on to.
  useEffect(() => {
    if (focusAfter.current === null) return;
    const el = document.querySelector<HTMLElement>(`[data-card-id="${focusAfter.current}"]`);
    const active = document.activeElement;
    if (el && el !== active && (active === null || active === document.body)) el.focus();
  }, [items]);

  const weekStats = useMemo(() => {
    const stats = weeks.map((w) => {
      const mine = items.filter((i) => i.weekId === w.id);
      const levels = new Array(powerBands.length).fill(0);
      let load = 0;
      let seconds = 0;
      for (const i of mine) {
        const e = shapes[i.shape];
        seconds += i.durationS;
        if (e) {
          load += e.load;
          e.levels.forEach((m, k) => (levels[k] += m));
        }
      }
      return { week: w, load, seconds, levels };
    });
    // The rise is measured from the last loaded week that was not a recovery week.
    const out: ((typeof stats)[number] & { rise: number; warn: boolean })[] = [];
    let prev: number | null = null;
    for (const s of stats) {
      const rise = prev && prev > 0 && !s.week.recovery ? (s.load - prev) / prev : 0;
      if (!s.week.recovery && s.load > 0) prev = s.load;
      out.push({ ...s, rise, warn: rise > RISE_CAP });
    }
    return out;
  }, [weeks, items, shapes, powerBands.length]);
  const maxLoad = Math.max(1, ...weekStats.map((s) => s.load));
  const selectedItem = items.find((i) => i.id === selected) ?? null;
  const activeShelf =
    activeId && String(activeId).startsWith("shelf:")
      ? shelf.find((s) => s.id === Number(String(activeId).slice(6)))
      : null;
  const activeItem =
    activeId && String(activeId).startsWith("item:")
      ? items.find((i) => i.id === Number(String(activeId).slice(5)))
      : null;

  return (
    <DndContext
      id="plan-board"
      sensors={sensors}
      collisionDetection={collision}
      onDragStart={onDragStart}
      onDragMove={() => mode.current === "pointer" && setTarget(target.current)}
      onDragEnd={onDragEnd}
      onDragCancel={onDragCancel}
      accessibility={{
        announcements,
        screenReaderInstructions: {
          draggable:
            "To move this session with the keyboard, press Space, then the arrow keys: up and down through the days, left and right between weeks. Space drops it, Escape cancels.",
        },
      }}
    >
      <ShapeDefs shapes={shapes} />
      <div className="flex min-h-[70vh] flex-col gap-3 lg:flex-row">
        <aside
          className="flex w-full shrink-0 flex-col rounded-xl border border-line bg-white lg:w-60"
          aria-label="Session shelf"
        >
          <div className="border-b border-line p-3">
            <h2 className="font-semibold">Session shelf</h2>
            <label className="mt-2 block text-xs">
              <span className="sr-only">Search the shelf</span>
              <input
                type="search"
                value={q}
                onChange={(e) => setQ(e.target.value)}
                placeholder="Search the shelf"
                className="w-full rounded-md border border-line px-2 py-1.5 text-sm"
              />
            </label>
            <p className="mt-2 text-xs text-ink-soft">
              Drag a session onto a day, or focus it and press Space, then the arrow keys.
            </p>
          </div>
          <ul className="flex max-h-48 flex-col gap-2 overflow-y-auto p-3 lg:max-h-[70vh]" aria-label="Shelf sessions">
            {shelf.map((s) => (
              <li key={s.id}>
                <ShelfCard session={s} />
              </li>
            ))}
            {shelfFetcher.data && shelf.length === 0 && <li className="text-sm text-ink-soft">No sessions match.</li>}
          </ul>
        </aside>

        <div className="relative min-w-0 flex-1 overflow-x-auto pb-3" aria-label="Weeks of the plan">
          {message && (
            <div
              role={message.tone === "error" ? "alert" : "status"}
              className={`sticky left-0 mb-2 rounded-lg px-3 py-2 text-sm ${message.tone === "error" ? "bg-brick/10 text-brick" : "bg-teal/10 text-teal-dark"}`}
            >
              {message.text}
            </div>
          )}
          {/* On a phone each week is a list of its days, one week under the other, so nothing needs sideways scrolling. */}
          <ol className="flex flex-col gap-3 md:flex-row">
            {(hydrated ? weekStats : weekStats.slice(0, SERVER_WEEKS)).map(
              ({ week, load, seconds, levels, warn, rise }) => (
                <li key={week.id} className="w-full shrink-0 md:w-52" data-testid={`week-${week.idx}`}>
                  <WeekColumn
                    week={week}
                    weeks={weeks}
                    live={hydrated}
                    startDate={plan.startDate}
                    load={load}
                    maxLoad={maxLoad}
                    seconds={seconds}
                    levels={levels}
                    warn={warn}
                    rise={rise}
                    items={items.filter((i) => i.weekId === week.id)}
                    selected={selected}
                    onSelect={setSelected}
                    drop={drop && drop.weekId === week.id ? drop : null}
                    dropName={activeShelf?.name ?? activeItem?.name ?? ""}
                    movingId={activeItem?.id ?? null}
                    onWeekOp={(op, toWeek) =>
                      change(
                        { op, fromWeek: week.id, toWeek },
                        op === "duplicate-week" ? `Copied week ${week.idx}.` : `Moved week ${week.idx}'s sessions.`,
                      )
                    }
                  />
                </li>
              ),
            )}
            {!hydrated && weeks.length > SERVER_WEEKS && (
              <li className="bw-week w-full shrink-0 p-2.5 text-sm text-ink-soft md:w-52">
                Weeks {weeks[SERVER_WEEKS].idx}–{weeks[weeks.length - 1].idx} appear in a moment.
              </li>
            )}
          </ol>
        </div>

        {selectedItem && (
          <ItemDrawer
            key={`${selectedItem.id}:${selectedItem.weekId}:${selectedItem.day}:${selectedItem.notes}`}
            planId={plan.id}
            item={selectedItem}
            steps={shapes[selectedItem.shape]?.steps ?? []}
            load={shapes[selectedItem.shape]?.load ?? null}
            weeks={weeks}
            onClose={() => setSelected(null)}
            onRemove={() => {
              change({ op: "remove", itemId: selectedItem.id }, `Removed ${selectedItem.name}.`);
              setSelected(null);
            }}
            onMove={(toWeek, toDay) =>
              change(
                {
                  op: "move",
                  itemId: selectedItem.id,
                  toWeek,
                  toDay,
                  toIndex: items.filter((i) => i.weekId === toWeek && i.day === toDay && i.id !== selectedItem.id)
                    .length,
                },
                `Moved ${selectedItem.name}.`,
              )
            }
            onTime={(t) => change({ op: "time", itemId: selectedItem.id, timeOfDay: t })}
            onNote={(notes) =>
              change({ op: "note", itemId: selectedItem.id, notes }, `Saved the note on ${selectedItem.name}.`)
            }
          />
        )}
      </div>
      <DragOverlay style={{ pointerEvents: "none" }}>
        {keyboardDrag ? null : activeShelf ? (
          <CardBody
            name={activeShelf.name}
            durationS={activeShelf.durationS}
            profile={<SessionProfile steps={activeShelf.profile} height={CARD_PROFILE_HEIGHT} className="mt-1" />}
            lifted
          />
        ) : activeItem ? (
          <CardBody
            name={activeItem.name}
            durationS={activeItem.durationS}
            profile={<ShapeUse shape={activeItem.shape} />}
            lifted
          />
        ) : null}
      </DragOverlay>
    </DndContext>
  );
}

const CARD_PROFILE_HEIGHT = 18;
const shapeId = (k: number) => `bs${k}`;

/**
 * Each distinct profile is drawn once, as a symbol; the cards reuse it. A year's board holds hundreds of cards but
 * only a few different sessions, and each profile is a dozen shapes.
 */
function ShapeDefs({ shapes }: { shapes: BoardShape[] }) {
  return (
    <svg aria-hidden="true" className="absolute h-0 w-0 overflow-hidden">
      <defs>
        {shapes.map((sh, k) => (
          <symbol key={k} id={shapeId(k)} viewBox={`0 0 300 ${CARD_PROFILE_HEIGHT}`} preserveAspectRatio="none">
            <ProfileMarks steps={sh.steps} height={CARD_PROFILE_HEIGHT} />
          </symbol>
        ))}
      </defs>
    </svg>
  );
}

function ShapeUse({ shape }: { shape: number }) {
  if (shape < 0) return <div className="mt-1" style={{ height: CARD_PROFILE_HEIGHT }} />;
  return (
    <svg className="bc-profile" aria-hidden="true">
      <use href={`#${shapeId(shape)}`} />
    </svg>
  );
}

function CardBody({
  name,
  durationS,
  profile,
  test,
  time,
  note,
  lifted,
}: {
  name: string;
  durationS: number;
  profile: React.ReactNode;
  test?: boolean;
  time?: string | null;
  note?: boolean;
  lifted?: boolean;
}) {
  return (
    <div className={lifted ? "bc bc-lifted" : "bc"}>
      <div className="bc-head">
        <span>{name}</span>
        <span>{formatMinutes(durationS)}</span>
      </div>
      {profile}
      {(test || time || note) && (
        <div className="bc-tags">
          {test && <span className="bg-brick/15 text-brick">field test</span>}
          {note && <span className="bg-teal/10 text-teal-dark">note</span>}
          {time && <span className="num bg-paper-deep">{time}</span>}
        </div>
      )}
    </div>
  );
}

function ShelfCard({ session }: { session: ShelfEntry }) {
  const { attributes, listeners, setNodeRef, isDragging } = useDraggable({
    id: `shelf:${session.id}`,
    data: { sessionId: session.id },
  });
  return (
    <button
      ref={setNodeRef}
      type="button"
      {...attributes}
      {...listeners}
      aria-label={`Shelf session ${session.name}, ${formatMinutes(session.durationS)}`}
      className={`block w-full cursor-grab ${isDragging ? "opacity-40" : ""}`}
    >
      <CardBody
        name={session.name}
        durationS={session.durationS}
        profile={
          <SessionProfile
            steps={session.profile}
            height={CARD_PROFILE_HEIGHT}
            className="mt-1"
            label={`Profile of ${session.name}`}
          />
        }
      />
    </button>
  );
}

function WeekColumn(props: {
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

function BoardCard({ item, selected, onSelect }: { item: BoardItem; selected: boolean; onSelect: () => void }) {
  const { attributes, listeners, setNodeRef } = useDraggable({
    id: itemKey(item.id),
    disabled: item.id < 0,
  });
  return (
    <button
      ref={setNodeRef}
      type="button"
      {...attributes}
      {...listeners}
      onClick={onSelect}
      aria-pressed={selected}
      aria-label={`${item.name}, ${formatMinutes(item.durationS)}`}
      data-testid="board-item"
      data-card-id={item.id}
      className={selected ? "bc-button ring-2 ring-teal" : "bc-button"}
    >
      <CardBody
        name={item.name}
        durationS={item.durationS}
        profile={<ShapeUse shape={item.shape} />}
        test={item.test}
        time={item.timeOfDay}
        note={Boolean(item.notes)}
      />
    </button>
  );
}

function ItemDrawer({
  planId,
  item,
  steps,
  load,
  weeks,
  onClose,
  onRemove,
  onMove,
  onTime,
  onNote,
}: {
  planId: number;
  item: BoardItem;
  steps: ProfileStep[];
  load: number | null;
  weeks: BoardWeek[];
  onClose: () => void;
  onRemove: () => void;
  onMove: (w: number, d: number) => void;
  onTime: (t: string | null) => void;
  onNote: (notes: string) => void;
}) {
  // The board gives this drawer a key per card, place and note, so its fields start afresh from the item.
  const [note, setNote] = useState(item.notes);
  // The blocks in words are the one thing the board does not carry: they come when the card is opened.
  const detail = useFetcher<{ item: { id: number; blocks: Block[] } }>();
  useEffect(() => {
    if (item.id > 0) detail.load(`/api/plans/${planId}/items?item=${item.id}`);
  }, [planId, item.id]); // eslint-disable-line react-hooks/exhaustive-deps -- the fetcher object changes with every answer; the card is the trigger
  const blocks = detail.data?.item?.id === item.id ? detail.data.item.blocks : null;
  const [toWeek, setToWeek] = useState(item.weekId);
  const [toDay, setToDay] = useState(item.day);
  return (
    <aside
      className="w-full shrink-0 rounded-xl border border-line bg-white p-4 text-sm lg:w-72"
      aria-label="Selected session"
    >
      <div className="flex items-start justify-between gap-2">
        <h2 className="font-semibold">{item.name}</h2>
        <button
          type="button"
          onClick={onClose}
          className="rounded px-2 text-ink-soft hover:bg-paper-deep"
          aria-label="Close details"
        >
          ✕
        </button>
      </div>
      <SessionProfile steps={steps} height={48} className="mt-2" />
      {blocks ? (
        <ol className="mt-3 flex flex-col gap-1" aria-label="Blocks">
          {blocks.map((b, i) => (
            <li key={i} className="num">
              {describeBlock(b)}
            </li>
          ))}
        </ol>
      ) : (
        <p className="mt-3 text-ink-soft" role="status">
          {detail.state === "idle" && detail.data ? "The blocks could not be loaded." : "Loading the blocks…"}
        </p>
      )}
      <dl className="num mt-3 grid grid-cols-2 gap-1 text-xs">
        <dt className="text-ink-soft">Duration</dt>
        <dd className="text-right">{formatMinutes(item.durationS)}</dd>
        {load !== null && (
          <>
            <dt className="text-ink-soft">Planned effort load</dt>
            <dd className="text-right">{Math.round(load)} points</dd>
            <dd className="col-span-2 text-ink-soft">Effort score (0–10) times minutes, as planned.</dd>
          </>
        )}
      </dl>
      <label className="mt-3 flex items-center justify-between gap-2">
        Time of day
        <input
          type="time"
          defaultValue={item.timeOfDay ?? ""}
          onBlur={(e) => onTime(e.target.value || null)}
          className="rounded border border-line px-1 py-0.5"
        />
      </label>
      <label className="mt-3 flex flex-col gap-1">
        <span>Note for the athlete</span>
        <textarea
          value={note}
          onChange={(e) => setNote(e.target.value)}
          rows={3}
          maxLength={2000}
          className="rounded border border-line px-2 py-1"
          placeholder="Shown on the athlete's session page and in the calendar feed"
        />
      </label>
      <button
        type="button"
        className={buttonClass("secondary", "mt-1 px-2 py-0.5")}
        disabled={note === item.notes}
        onClick={() => onNote(note)}
      >
        Save note
      </button>
      <fieldset className="mt-3 rounded-lg border border-line p-2">
        <legend className="px-1 text-xs text-ink-soft">Move to</legend>
        <div className="flex gap-1">
          <select
            value={toWeek}
            onChange={(e) => setToWeek(Number(e.target.value))}
            aria-label="Move to week"
            className="flex-1 rounded border border-line px-1 py-0.5"
          >
            {weeks.map((w) => (
              <option key={w.id} value={w.id}>
                Week {w.idx}
              </option>
            ))}
          </select>
          <select
            value={toDay}
            onChange={(e) => setToDay(Number(e.target.value))}
            aria-label="Move to day"
            className="rounded border border-line px-1 py-0.5"
          >
            {DAY_NAMES.map((d, i) => (
              <option key={d} value={i}>
                {d}
              </option>
            ))}
          </select>
          <button
            type="button"
            className={buttonClass("secondary", "px-2 py-0.5")}
            onClick={() => onMove(toWeek, toDay)}
          >
            Move
          </button>
        </div>
      </fieldset>
      <button type="button" onClick={onRemove} className={buttonClass("danger", "mt-3 w-full")}>
        Remove from plan
      </button>
    </aside>
  );
}
