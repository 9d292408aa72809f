import { DndContext, DragOverlay } from "@dnd-kit/core";
import { useMemo, useState, useSyncExternalStore } from "react";
import { CARD_PROFILE_HEIGHT, CardBody, ShapeDefs, ShapeUse } from "~/components/board/board-card";
import type { BoardData, ShelfEntry } from "~/components/board/board-changes";
import { ItemDrawer } from "~/components/board/item-drawer";
import { ShelfPanel, useShelf } from "~/components/board/shelf-panel";
import { useBoardDrag } from "~/components/board/use-board-drag";
import { useBoardOperations } from "~/components/board/use-board-operations";
import { WeekColumn } from "~/components/board/week-column";
import { weekStats } from "~/components/board/week-stats";
import { useBandSet } from "~/components/bands-context";
import { SessionProfile } from "~/components/session-profile";
import type { BoardItem, BoardWeek } from "~/lib/board";

export type { BoardData, BoardItem, BoardWeek };

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

/** The plan's weeks as columns of days, the session shelf beside them and the opened card's drawer. */
export function PlanBoard({ data, shelf: shelfAtLoad }: { data: BoardData; shelf: ShelfEntry[] }) {
  const { plan, weeks } = data;
  const hydrated = useHydrated();
  const shelfState = useShelf(plan.id, shelfAtLoad);
  const shelf = shelfState.sessions;
  const { items, shapes, message, change } = useBoardOperations(data, shelf);
  const [selected, setSelected] = useState<number | null>(null);
  const { activeId, drop, keyboardDrag, dndProps } = useBoardDrag({
    items,
    weeks,
    startDate: plan.startDate,
    shelf,
    change,
  });
  const powerBands = useBandSet("bike:power").bands;

  const stats = useMemo(
    () => weekStats(weeks, items, shapes, powerBands.length),
    [weeks, items, shapes, powerBands.length],
  );
  const maxLoad = Math.max(1, ...stats.map((s) => s.load));
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
    <DndContext id="plan-board" {...dndProps}>
      <ShapeDefs shapes={shapes} />
      <div className="flex min-h-[70vh] flex-col gap-3 lg:flex-row">
        <ShelfPanel shelf={shelfState} />

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
            {(hydrated ? stats : stats.slice(0, SERVER_WEEKS)).map(({ week, load, seconds, levels, warn, rise }) => (
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
            ))}
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
