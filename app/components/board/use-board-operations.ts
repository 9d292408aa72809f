import { useEffect, useMemo, useRef, useState } from "react";
import { useFetcher, useRevalidator } from "react-router";
import { useBandSet } from "~/components/bands-context";
import {
  applyLocal,
  type BoardData,
  type Drawn,
  type Op,
  type ServerReply,
  type ShelfEntry,
} from "~/components/board/board-changes";
import { boardItems, boardView, type BoardItem, type BoardShape } from "~/lib/board";

export type BoardMessage = { tone: "ok" | "error"; text: string } | null;

/**
 * The board's items as the coach sees them: each change is drawn at once and sent to the server, one at a time,
 * each with the version the previous answer gave; the server's answer then replaces the optimistic board, and a
 * refusal puts back the last confirmed one.
 */
export function useBoardOperations(data: BoardData, shelf: ShelfEntry[]) {
  const { plan } = data;
  const shipped = useMemo(() => boardItems(data.cards, data.shapes), [data.cards, data.shapes]);
  const [items, setItems] = useState<BoardItem[]>(shipped);
  const [shapes, setShapes] = useState<BoardShape[]>(data.shapes);
  const [version, setVersion] = useState(plan.version);
  const [message, setMessage] = useState<BoardMessage>(null);
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
  }, [fetcher.state, fetcher.data]); // eslint-disable-line react-hooks/exhaustive-deps -- an answer is the only trigger; send and the bands are read as they are then

  /** Draws the change at once and sends it (or queues it behind the one in flight); `announce` is said when it is made. */
  const change = (op: Op, announce?: string) => {
    setMessage(announce ? { tone: "ok", text: announce } : null);
    setItems((list) => applyLocal(list, op, shelf, tempIds.current--));
    if (fetcher.state === "idle" && queue.current.length === 0) send(op, version);
    else queue.current.push(op);
  };

  return { items, shapes, message, change };
}
