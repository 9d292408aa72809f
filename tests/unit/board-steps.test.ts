import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { describeDay, describeTarget, stepTarget, type DropTarget } from "~/components/board/drop-target";
import { monthGrid, monthOf, shiftMonth } from "~/lib/month";

const weeks = [11, 12, 13];
const items = [
  { id: 1, weekId: 11, day: 1, position: 0, name: "A" },
  { id: 2, weekId: 11, day: 1, position: 1, name: "B" },
  { id: 3, weekId: 12, day: 1, position: 0, name: "C" },
];

describe("keyboard steps on the plan board", () => {
  it("walks the places of a day, then the next day, then across the week boundary", () => {
    let t: DropTarget | null = { weekId: 11, day: 0, index: 0 };
    const seen: string[] = [];
    for (let i = 0; i < 10 && t; i++) {
      seen.push(`${t.weekId}/${t.day}/${t.index}`);
      t = stepTarget(t, "down", weeks, items, null);
    }
    // Monday (empty), Tuesday before A, before B, after B, Wednesday … Sunday, then Monday of the next week.
    expect(seen).toEqual([
      "11/0/0",
      "11/1/0",
      "11/1/1",
      "11/1/2",
      "11/2/0",
      "11/3/0",
      "11/4/0",
      "11/5/0",
      "11/6/0",
      "12/0/0",
    ]);
  });

  it("left and right keep the day and land after what is there; the edges of the plan stop the step", () => {
    expect(stepTarget({ weekId: 11, day: 1, index: 0 }, "right", weeks, items, null)).toEqual({
      weekId: 12,
      day: 1,
      index: 1,
    });
    expect(stepTarget({ weekId: 12, day: 1, index: 0 }, "left", weeks, items, null)).toEqual({
      weekId: 11,
      day: 1,
      index: 2,
    });
    expect(stepTarget({ weekId: 11, day: 3, index: 0 }, "left", weeks, items, null)).toBeNull();
    expect(stepTarget({ weekId: 13, day: 3, index: 0 }, "right", weeks, items, null)).toBeNull();
    expect(stepTarget({ weekId: 13, day: 6, index: 0 }, "down", weeks, items, null)).toBeNull();
    expect(stepTarget({ weekId: 11, day: 0, index: 0 }, "up", weeks, items, null)).toBeNull();
  });

  it("the session being moved does not count as a place in its own day", () => {
    expect(stepTarget({ weekId: 11, day: 1, index: 0 }, "down", weeks, items, 1)).toEqual({
      weekId: 11,
      day: 1,
      index: 1,
    });
    expect(stepTarget({ weekId: 11, day: 1, index: 1 }, "down", weeks, items, 1)).toEqual({
      weekId: 11,
      day: 2,
      index: 0,
    });
    expect(describeTarget({ weekId: 11, day: 1, index: 0 }, 1, null, items, 1)).toBe("Tuesday, week 1, before B");
  });

  it("up undoes down everywhere inside the plan (property)", () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...weeks),
        fc.integer({ min: 0, max: 6 }),
        fc.integer({ min: 0, max: 2 }),
        (weekId, day, raw) => {
          const count = items.filter((i) => i.weekId === weekId && i.day === day).length;
          const start = { weekId, day, index: Math.min(raw, count) };
          const down = stepTarget(start, "down", weeks, items, null);
          if (down) expect(stepTarget(down, "up", weeks, items, null)).toEqual(start);
        },
      ),
    );
  });

  it("names the day with its date when the plan has a start (Intl, en-GB)", () => {
    expect(describeDay(2, 1, "2026-12-07")).toBe("Tuesday 15 December, week 2");
    expect(describeDay(2, 1, null)).toBe("Tuesday, week 2");
  });
});

describe("month grid", () => {
  it("covers whole weeks from the Monday on or before the 1st to the Sunday on or after the last day", () => {
    // December 2026 starts on a Tuesday and ends on a Thursday (the next test checks every month against Date).
    expect(monthGrid("2026-12")).toEqual({
      from: "2026-11-30",
      to: "2027-01-03",
      first: "2026-12-01",
      last: "2026-12-31",
    });
    expect(monthGrid("2027-02")).toEqual({
      from: "2027-02-01",
      to: "2027-02-28",
      first: "2027-02-01",
      last: "2027-02-28",
    });
    expect(monthGrid("2028-02").last).toBe("2028-02-29");
    expect(shiftMonth("2026-12", 1)).toBe("2027-01");
    expect(shiftMonth("2027-01", -1)).toBe("2026-12");
    expect(monthOf("2026-13", "2026-12-02")).toBe("2026-12");
    expect(monthOf(null, "2026-12-02")).toBe("2026-12");
  });

  it("agrees with the platform's own calendar arithmetic on weekdays (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1990, max: 2100 }), fc.integer({ min: 1, max: 12 }), (y, m) => {
        const month = `${y}-${String(m).padStart(2, "0")}`;
        const g = monthGrid(month);
        expect(new Date(`${g.from}T00:00:00Z`).getUTCDay()).toBe(1);
        expect(new Date(`${g.to}T00:00:00Z`).getUTCDay()).toBe(0);
        expect(new Date(Date.UTC(y, m, 0)).toISOString().slice(0, 10)).toBe(g.last);
      }),
    );
  });
});
