import { useEffect, useState } from "react";
import { useFetcher } from "react-router";
import { SessionProfile } from "~/components/session-profile";
import type { ProfileStep } from "~/lib/board";
import { buttonClass } from "~/components/ui/button";
import type { BoardItem, BoardWeek } from "~/lib/board";
import { formatMinutes } from "~/lib/duration";
import { DAY_NAMES } from "~/lib/plan-labels";
import { describeBlock } from "~/lib/session-text";
import type { Block } from "~/lib/training";

/** The opened card: its blocks, load, time of day, note, a move by menus, and removal. */
export function ItemDrawer({
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
  const detail = useFetcher<{ item: { id: number; blocks: Block[] } | null; error: string | null }>();
  const { load: loadDetail } = detail;
  useEffect(() => {
    if (item.id > 0) void loadDetail(`/coach/plans/${planId}/board/items/${item.id}`);
  }, [loadDetail, planId, item.id]);
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
          {detail.state === "idle" && detail.data
            ? (detail.data.error ?? "The blocks could not be loaded.")
            : "Loading the blocks…"}
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
