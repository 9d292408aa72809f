import { blockDuration, estimateSession, expandBlocks, type Band, type Block } from "~/lib/training";

/** One step of a session profile as the small SVG draws it: start, duration, low and high (% of threshold). */
export interface ProfileStep {
  s: number;
  d: number;
  lo: number | null;
  hi: number | null;
  ramp: boolean;
}

/**
 * What the plan board draws, and nothing more. A plan holds the same few sessions many times over (copies of shelf
 * sessions, weeks duplicated), so each distinct block list becomes one shape — its step profile, planned effort load
 * and minutes per band — and the cards point at it by index. The blocks themselves reach the browser only when a
 * card is opened (`GET /api/plans/:id/items?item=…`).
 */
export interface BoardShape {
  steps: ProfileStep[];
  durationS: number;
  /** Planned effort load (effort score × minutes); 0 when the blocks cannot be estimated. */
  load: number;
  /** Minutes in each band of the viewer's power band set. */
  levels: number[];
  /** A field test's session (its cards carry a mark). */
  test: boolean;
}

/**
 * One card as the page ships it: [id, weekId, day, position, shape, name, timeOfDay, notes], the last two left out
 * when empty. A tuple costs a quarter of the bytes of an object in the page's data, and a year has hundreds of cards.
 */
export type BoardCard = [number, number, number, number, number, string, (string | null)?, string?];

/** A card as the board works with it. */
export interface BoardItem {
  id: number;
  weekId: number;
  day: number;
  position: number;
  name: string;
  durationS: number;
  /** Index into the board's shapes; −1 for a card the server has not answered for yet. */
  shape: number;
  test: boolean;
  timeOfDay: string | null;
  notes: string;
}

export interface BoardWeek {
  id: number;
  idx: number;
  phase: string;
  recovery: boolean;
  test: boolean;
  plannedHours: number;
}

interface FullItem {
  id: number;
  weekId: number;
  day: number;
  position: number;
  name: string;
  testProtocol: string | null;
  /** The block list, or its JSON text as stored (cards with the same text share a shape without parsing it again). */
  blocks: readonly Block[] | string;
  timeOfDay: string | null;
  notes?: string | null;
}

function shapeOf(blocks: readonly Block[], test: boolean, bands: readonly Band[]): BoardShape {
  let steps: ProfileStep[] = [];
  let durationS = 0;
  try {
    steps = expandBlocks(blocks).map((s) => ({
      s: s.startS,
      d: s.durationS,
      lo: s.lowPct,
      hi: s.highPct,
      ramp: s.ramp,
    }));
    durationS = blocks.reduce((sum, b) => sum + blockDuration(b), 0);
  } catch {
    // A block list the engine refuses still gets its card, without a profile.
  }
  try {
    const e = estimateSession(blocks, {}, bands);
    return { steps, durationS, load: e.plannedEffortLoad, levels: e.minutesPerBand, test };
  } catch {
    return { steps, durationS, load: 0, levels: bands.map(() => 0), test };
  }
}

/** Full plan items (as the service and the board's JSON route give them) → the board's cards and distinct shapes. */
export function boardView(
  items: readonly FullItem[],
  bands: readonly Band[],
): { cards: BoardCard[]; shapes: BoardShape[] } {
  const index = new Map<string, number>();
  const shapes: BoardShape[] = [];
  const cards = items.map((i): BoardCard => {
    const text = typeof i.blocks === "string" ? i.blocks : JSON.stringify(i.blocks);
    const test = Boolean(i.testProtocol);
    const key = `${test ? "t" : "-"}${text}`;
    let shape = index.get(key);
    if (shape === undefined) {
      const blocks = typeof i.blocks === "string" ? (JSON.parse(i.blocks) as Block[]) : i.blocks;
      shape = shapes.push(shapeOf(blocks, test, bands)) - 1;
      index.set(key, shape);
    }
    const card: BoardCard = [i.id, i.weekId, i.day, i.position, shape, i.name];
    if (i.timeOfDay || i.notes) card.push(i.timeOfDay ?? null);
    if (i.notes) card.push(i.notes);
    return card;
  });
  return { cards, shapes };
}

/** The shipped cards → the board's working list. */
export function boardItems(cards: readonly BoardCard[], shapes: readonly BoardShape[]): BoardItem[] {
  return cards.map(([id, weekId, day, position, shape, name, timeOfDay, notes]) => ({
    id,
    weekId,
    day,
    position,
    name,
    shape,
    durationS: shapes[shape]?.durationS ?? 0,
    test: shapes[shape]?.test ?? false,
    timeOfDay: timeOfDay ?? null,
    notes: notes ?? "",
  }));
}
