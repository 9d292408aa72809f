import type { boardView, BoardCard, BoardItem, BoardShape, BoardWeek } from "~/lib/board";

/** What the board page's loader hands the board. */
export interface BoardData {
  plan: { id: number; name: string; startDate: string | null; version: number };
  weeks: BoardWeek[];
  cards: BoardCard[];
  shapes: BoardShape[];
}
/** One session on the shelf, as the board's loader and its shelf search give it. */
export interface ShelfEntry {
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
/** One change to the plan, as `POST /api/plans/:id/items` takes it (with the version it was made against). */
export type Op =
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
export type ServerReply =
  { version: number; items: Parameters<typeof boardView>[0] } | { error: string; version?: number };
export type Drawn = { items: BoardItem[]; shapes: BoardShape[] };

/** Applies a change to the local items at once (optimistic); the server's answer then replaces them. */
export function applyLocal(items: BoardItem[], op: Op, shelf: ShelfEntry[], tempId: number): BoardItem[] {
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
