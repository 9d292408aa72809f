import { describe, expect, it } from "vitest";
import { boardItems, boardView } from "~/lib/board";
import { defaultBandSet, estimateSession, type Block } from "~/lib/training";

const steady: Block[] = [{ kind: "steady", durationS: 1800, target: { metric: "power", lowPct: 70, highPct: 75 } }];
const reps: Block[] = [
  { kind: "warmup", durationS: 600, target: { metric: "power", lowPct: 50, highPct: 65 } },
  {
    kind: "repeats",
    count: 3,
    work: { durationS: 300, target: { metric: "power", lowPct: 105, highPct: 110 } },
    recovery: { durationS: 180, target: { metric: "power", lowPct: 50 } },
  },
];
const item = (
  id: number,
  blocks: Block[] | string,
  extra: Partial<{ testProtocol: string; timeOfDay: string; notes: string }> = {},
) => ({
  id,
  weekId: 1,
  day: id % 7,
  position: 0,
  name: `S${id}`,
  testProtocol: null,
  timeOfDay: null,
  notes: "",
  blocks,
  ...extra,
});

describe("board view", () => {
  const bands = defaultBandSet("bike:power").bands;

  it("gives each distinct block list one shape, whether the blocks come parsed or as stored JSON text", () => {
    const { cards, shapes } = boardView(
      [item(1, steady), item(2, JSON.stringify(steady)), item(3, reps), item(4, reps, { testProtocol: "ramp" })],
      bands,
    );
    expect(shapes).toHaveLength(3);
    expect(cards.map((c) => c[4])).toEqual([0, 0, 1, 2]);
    expect(shapes[2].test).toBe(true);
    expect(shapes[1].steps).toHaveLength(1 + 3 * 2);
    // The shape carries the engine's own estimate of the blocks in the given bands.
    expect(shapes[1].load).toBe(estimateSession(reps, {}, bands).plannedEffortLoad);
    expect(shapes[1].levels).toEqual(estimateSession(reps, {}, bands).minutesPerBand);
    expect(shapes[1].durationS).toBe(600 + 3 * 300 + 3 * 180);
  });

  it("leaves empty time and note out of the card and restores them when decoding", () => {
    const { cards, shapes } = boardView(
      [item(1, steady), item(2, steady, { notes: "Easy" }), item(3, steady, { timeOfDay: "06:30" })],
      bands,
    );
    expect(cards.map((c) => c.length)).toEqual([6, 8, 7]);
    const items = boardItems(cards, shapes);
    expect(items.map((i) => [i.timeOfDay, i.notes, i.durationS])).toEqual([
      [null, "", 1800],
      [null, "Easy", 1800],
      ["06:30", "", 1800],
    ]);
  });

  it("still draws a card for blocks the engine refuses, without profile or load", () => {
    const { shapes } = boardView(
      [item(1, [{ kind: "steady", durationS: -5, target: { metric: "power", lowPct: 70 } }] as Block[])],
      bands,
    );
    expect(shapes[0].load).toBe(0);
    expect(shapes[0].levels.every((m) => m === 0)).toBe(true);
  });
});
