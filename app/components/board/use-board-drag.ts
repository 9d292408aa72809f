import {
  type CollisionDetection,
  PointerSensor,
  useSensor,
  useSensors,
  type DragEndEvent,
  type DragStartEvent,
  type UniqueIdentifier,
} from "@dnd-kit/core";
import { useEffect, useMemo, useRef, useState } from "react";
import { useDragAnnouncements, SCREEN_READER_INSTRUCTIONS } from "~/components/board/use-drag-announcements";
import type { Op, ShelfEntry } from "~/components/board/board-changes";
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
import type { BoardItem, BoardWeek } from "~/lib/board";

const movingItemId = (id: UniqueIdentifier | null | undefined) =>
  id && String(id).startsWith("item:") ? Number(String(id).slice(5)) : null;

/**
 * Dragging on the board, by pointer and by keyboard: where a card would land, what is said about it, and the change
 * a drop makes. Returns the props for `DndContext` and what the board draws during a drag.
 */
export function useBoardDrag({
  items,
  weeks,
  startDate,
  shelf,
  change,
}: {
  items: BoardItem[];
  weeks: BoardWeek[];
  startDate: string | null;
  shelf: ShelfEntry[];
  change: (op: Op, announce?: string) => void;
}) {
  const [activeId, setActiveId] = useState<UniqueIdentifier | null>(null);
  const weekById = useMemo(() => new Map(weeks.map((w) => [w.id, w])), [weeks]);
  const nameOf = (id: UniqueIdentifier) => {
    const s = String(id);
    if (s.startsWith("shelf:")) return shelf.find((x) => x.id === Number(s.slice(6)))?.name ?? "session";
    return items.find((i) => i.id === Number(s.slice(5)))?.name ?? "session";
  };

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
  const live = useRef({ items, weeks, startDate });
  useEffect(() => {
    live.current = { items, weeks, startDate };
  }, [items, weeks, startDate]);
  const describe = (t: DropTarget | null) => {
    const w = t ? weekById.get(t.weekId) : undefined;
    return t && w ? describeTarget(t, w.idx, startDate, items, moving.current) : "no day";
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
  const announcements = useDragAnnouncements({
    nameOf,
    viaKeyboard: () => mode.current === "keyboard",
    where: () => describe(target.current),
    isNew: (words) => {
      if (words === spoken.current) return false;
      spoken.current = words;
      return true;
    },
    finalWords: () => finalWords.current,
  });

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
    const where = describeDay(weekById.get(t.weekId)?.idx ?? 0, t.day, startDate);
    finalWords.current = `${name} placed on ${describeTarget(t, weekById.get(t.weekId)?.idx ?? 0, startDate, items, activeItemId)}.`;
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

  return {
    activeId,
    drop,
    keyboardDrag,
    dndProps: {
      sensors,
      collisionDetection: collision,
      onDragStart,
      onDragMove: () => mode.current === "pointer" && setTarget(target.current),
      onDragEnd,
      onDragCancel,
      accessibility: { announcements, screenReaderInstructions: SCREEN_READER_INSTRUCTIONS },
    },
  };
}
