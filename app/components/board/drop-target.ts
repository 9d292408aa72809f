import type { StepKey } from "~/components/board/step-keyboard-sensor";
import { addDays, formatDay } from "~/lib/dates";
import { DAY_LONG } from "~/lib/plan-labels";

/** Where a dragged session would land: a day of a week and its place among the sessions already there. */
export interface DropTarget {
  weekId: number;
  day: number;
  /** Position among the slot's sessions, not counting the one being moved. */
  index: number;
}
interface SlotItem {
  id: number;
  weekId: number;
  day: number;
  position: number;
  name: string;
}

export const slotId = (weekId: number, day: number) => `slot:${weekId}:${day}`;
export const sameTarget = (a: DropTarget | null, b: DropTarget | null) =>
  a === b || (!!a && !!b && a.weekId === b.weekId && a.day === b.day && a.index === b.index);

/** The sessions of one day in order, leaving out the one being moved. */
export function slotItems<T extends SlotItem>(items: T[], weekId: number, day: number, movingId: number | null): T[] {
  return items
    .filter((i) => i.weekId === weekId && i.day === day && i.id !== movingId)
    .sort((a, b) => a.position - b.position);
}

/**
 * One arrow-key step. Up and down walk through the places of a day (before each session, then after the last) and
 * on into the next or previous day, across the week boundary; left and right keep the day and change the week,
 * landing after the sessions already there. Returns null at the edges of the plan.
 */
export function stepTarget(
  t: DropTarget,
  key: StepKey,
  weekIds: number[],
  items: SlotItem[],
  movingId: number | null,
): DropTarget | null {
  const count = (weekId: number, day: number) => slotItems(items, weekId, day, movingId).length;
  const pos = weekIds.indexOf(t.weekId);
  if (pos < 0) return null;
  switch (key) {
    case "down":
      if (t.index < count(t.weekId, t.day)) return { ...t, index: t.index + 1 };
      if (t.day < 6) return { weekId: t.weekId, day: t.day + 1, index: 0 };
      return pos < weekIds.length - 1 ? { weekId: weekIds[pos + 1], day: 0, index: 0 } : null;
    case "up":
      if (t.index > 0) return { ...t, index: t.index - 1 };
      if (t.day > 0) return { weekId: t.weekId, day: t.day - 1, index: count(t.weekId, t.day - 1) };
      return pos > 0 ? { weekId: weekIds[pos - 1], day: 6, index: count(weekIds[pos - 1], 6) } : null;
    case "right":
    case "left": {
      const to = key === "right" ? pos + 1 : pos - 1;
      if (to < 0 || to >= weekIds.length) return null;
      return { weekId: weekIds[to], day: t.day, index: count(weekIds[to], t.day) };
    }
  }
}

/** "Tuesday 8 December, week 2" (the date only when the plan has a start date). */
export function describeDay(weekIdx: number, day: number, startDate: string | null) {
  const date = startDate
    ? ` ${formatDay(addDays(startDate, (weekIdx - 1) * 7 + day), { day: "numeric", month: "long" })}`
    : "";
  return `${DAY_LONG[day]}${date}, week ${weekIdx}`;
}

/** The day, plus the neighbour it will sit next to when the day already holds sessions. */
export function describeTarget(
  t: DropTarget,
  weekIdx: number,
  startDate: string | null,
  items: SlotItem[],
  movingId: number | null,
) {
  const here = slotItems(items, t.weekId, t.day, movingId);
  const where = describeDay(weekIdx, t.day, startDate);
  if (here.length === 0) return where;
  return t.index < here.length
    ? `${where}, before ${here[t.index].name}`
    : `${where}, after ${here[here.length - 1].name}`;
}

/**
 * The day slot under a point on screen, read from the live page. Measured rectangles go stale as soon as the board
 * or the page scrolls during a drag, which put drops a day or two away from the pointer; the element under the
 * pointer is always the one the coach sees there. The place within the day comes from the cards'
 * middles; the day's heading means the end of the day.
 */
export function targetAtPoint(
  x: number,
  y: number,
  movingId: number | null,
  doc: Document = document,
): DropTarget | null {
  const slot = doc.elementFromPoint(x, y)?.closest<HTMLElement>("[data-drop-slot]");
  if (!slot) return null;
  const [, weekId, day] = slot.dataset.dropSlot!.split(":").map(Number);
  const cards = [...slot.querySelectorAll<HTMLElement>("[data-card-id]")].filter(
    (c) => c.dataset.cardId !== String(movingId),
  );
  const rects = cards.map((c) => c.getBoundingClientRect());
  // On the day's heading (above its first card) a session joins the end of the day, like a drop on an empty day.
  if (rects.length === 0 || y < rects[0].top) return { weekId, day, index: rects.length };
  return { weekId, day, index: rects.filter((r) => r.top + r.height / 2 < y).length };
}
