import { useDraggable } from "@dnd-kit/core";
import { useEffect, useRef, useState } from "react";
import { useFetcher } from "react-router";
import { CARD_PROFILE_HEIGHT, CardBody } from "~/components/board/board-card";
import type { ShelfEntry } from "~/components/board/board-changes";
import { SessionProfile } from "~/components/session-profile";
import { formatMinutes } from "~/lib/duration";

/**
 * The coach's sessions matching the search; the board needs them too, to name and place a copy. The board's loader
 * brings the whole shelf; a search asks the board's own shelf route, once per pause in typing.
 */
export function useShelf(planId: number, initial: ShelfEntry[]) {
  const { load, data } = useFetcher<{ sessions: ShelfEntry[] }>();
  const [q, setQ] = useState("");
  const searched = useRef(false);
  useEffect(() => {
    // Until the first search the loader's shelf is the answer; a search cleared again asks anew.
    if (q === "" && !searched.current) return;
    searched.current = true;
    const t = setTimeout(() => void load(`/coach/plans/${planId}/board/shelf?q=${encodeURIComponent(q)}`), 200);
    return () => clearTimeout(t);
  }, [load, planId, q]);
  return { q, setQ, sessions: data?.sessions ?? initial, loaded: true };
}

export function ShelfPanel({ shelf }: { shelf: ReturnType<typeof useShelf> }) {
  return (
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
            value={shelf.q}
            onChange={(e) => shelf.setQ(e.target.value)}
            placeholder="Search the shelf"
            className="w-full rounded-md border border-line px-2 py-1.5 text-sm"
          />
        </label>
        <p className="mt-2 text-xs text-ink-soft">
          Drag a session onto a day, or focus it and press Space, then the arrow keys.
        </p>
      </div>
      <ul className="flex max-h-48 flex-col gap-2 overflow-y-auto p-3 lg:max-h-[70vh]" aria-label="Shelf sessions">
        {shelf.sessions.map((s) => (
          <li key={s.id}>
            <ShelfCard session={s} />
          </li>
        ))}
        {shelf.loaded && shelf.sessions.length === 0 && <li className="text-sm text-ink-soft">No sessions match.</li>}
      </ul>
    </aside>
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
