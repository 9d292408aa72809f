import {
  closestCenter,
  type CollisionDetection,
  DndContext,
  type DragStartEvent,
  PointerSensor,
  useSensor,
  useSensors,
  type Announcements,
  type DragEndEvent,
} from "@dnd-kit/core";
import { arrayMove, SortableContext, useSortable, verticalListSortingStrategy } from "@dnd-kit/sortable";
import { CSS } from "@dnd-kit/utilities";
import { useEffect, useMemo, useRef } from "react";
import { StepKeyboardSensor, type StepKey } from "~/components/board/step-keyboard-sensor";
import { buttonClass } from "~/components/ui/button";
import { BLOCK_LABEL, describeBlock } from "~/lib/sessions";
import type { Block } from "~/lib/training";
import { BlockFields } from "./step-editor";

export type Keyed = { key: string; block: Block };
let nextKey = 1;
export const keyed = (block: Block): Keyed => ({ key: `b${nextKey++}`, block });

type Errors = Record<string, string | undefined>;

/** The session's steps in order: drag (pointer or keyboard) or the arrow buttons reorder them, each edits in place. */
export function StepList({
  items,
  setItems,
  errors,
}: {
  items: Keyed[];
  setItems: React.Dispatch<React.SetStateAction<Keyed[]>>;
  errors: Errors;
}) {
  // The keyboard walks the list by position, not by measured rectangles: the geometric stepper scrolled the page on
  // its own and skipped or repeated positions once the blocks sat below the fold.
  const keyTarget = useRef<{ from: number; to: number; tops: DOMRect[] } | null>(null);
  // dnd-kit's keyboard callbacks run between renders; they read the list as last drawn.
  const liveItems = useRef(items);
  useEffect(() => {
    liveItems.current = items;
  }, [items]);
  const keyboardOptions = useMemo(
    () => ({
      step: (key: StepKey) => {
        const t = keyTarget.current;
        if (!t || (key !== "up" && key !== "down")) return false;
        const to = t.to + (key === "up" ? -1 : 1);
        if (to < 0 || to >= liveItems.current.length) return false;
        t.to = to;
        // Drawn where it will land: top edges line up moving up, bottom edges moving down.
        const a = t.tops[t.from];
        const b = t.tops[to];
        return { x: 0, y: to <= t.from ? b.top - a.top : b.bottom - a.bottom };
      },
    }),
    [],
  );
  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 4 } }),
    useSensor(StepKeyboardSensor, keyboardOptions),
  );
  const collision: CollisionDetection = (args) => {
    const t = keyTarget.current;
    if (!args.pointerCoordinates && t) return [{ id: liveItems.current[t.to].key }];
    return closestCenter(args);
  };
  const onDragStart = ({ active, activatorEvent }: DragStartEvent) => {
    if (!(activatorEvent instanceof KeyboardEvent)) return;
    const from = items.findIndex((i) => i.key === active.id);
    const tops = [...document.querySelectorAll<HTMLElement>('[data-testid="block"]')].map((el) =>
      el.getBoundingClientRect(),
    );
    keyTarget.current = { from, to: from, tops };
  };
  const position = (id: string | number) => items.findIndex((i) => i.key === id) + 1;
  const announcements: Announcements = {
    onDragStart: ({ active }) =>
      `Picked up block ${position(active.id)} of ${items.length}. Use the arrow keys to move it, Space to drop, Escape to cancel.`,
    onDragOver: ({ active, over }) =>
      over
        ? `Block ${position(active.id)} is over position ${position(over.id)}.`
        : `Block ${position(active.id)} is outside the list.`,
    onDragEnd: ({ over }) => (over ? `Block dropped at position ${position(over.id)}.` : "Block dropped where it was."),
    onDragCancel: () => "Moving cancelled; the block is back where it was.",
  };
  const onDragEnd = ({ active, over }: DragEndEvent) => {
    keyTarget.current = null;
    if (!over || active.id === over.id) return;
    setItems((list) =>
      arrayMove(
        list,
        list.findIndex((i) => i.key === active.id),
        list.findIndex((i) => i.key === over.id),
      ),
    );
  };

  const update = (key: string, block: Block) =>
    setItems((list) => list.map((i) => (i.key === key ? { key, block } : i)));
  const remove = (key: string) => setItems((list) => list.filter((i) => i.key !== key));
  const duplicate = (key: string) =>
    setItems((list) => {
      const i = list.findIndex((x) => x.key === key);
      return [...list.slice(0, i + 1), keyed(structuredClone(list[i].block)), ...list.slice(i + 1)];
    });
  const move = (key: string, by: -1 | 1) =>
    setItems((list) => {
      const i = list.findIndex((x) => x.key === key);
      const j = i + by;
      return j < 0 || j >= list.length ? list : arrayMove(list, i, j);
    });

  return (
    <DndContext
      id="session-blocks"
      sensors={sensors}
      collisionDetection={collision}
      onDragStart={onDragStart}
      onDragEnd={onDragEnd}
      onDragCancel={() => (keyTarget.current = null)}
      accessibility={{ announcements }}
    >
      <SortableContext items={items.map((i) => i.key)} strategy={verticalListSortingStrategy}>
        <ol className="flex flex-col gap-2" aria-label="Blocks of this session">
          {items.map((item, index) => (
            <SortableBlock
              key={item.key}
              id={item.key}
              index={index}
              count={items.length}
              block={item.block}
              errors={errors}
              onChange={(b) => update(item.key, b)}
              onRemove={() => remove(item.key)}
              onDuplicate={() => duplicate(item.key)}
              onMove={(by) => move(item.key, by)}
            />
          ))}
        </ol>
      </SortableContext>
    </DndContext>
  );
}

function SortableBlock(props: {
  id: string;
  index: number;
  count: number;
  block: Block;
  errors: Record<string, string | undefined>;
  onChange: (b: Block) => void;
  onRemove: () => void;
  onDuplicate: () => void;
  onMove: (by: -1 | 1) => void;
}) {
  const { attributes, listeners, setNodeRef, setActivatorNodeRef, transform, transition, isDragging } = useSortable({
    id: props.id,
  });
  const { block, index } = props;
  const prefix = `blocks.${index}`;
  const err = (path: string) => props.errors[`${prefix}.${path}`];
  return (
    <li
      ref={setNodeRef}
      style={{ transform: CSS.Transform.toString(transform), transition }}
      className={`rounded-xl border bg-white p-3 shadow-sm ${isDragging ? "z-10 border-teal shadow-lg" : "border-line"}`}
      data-testid="block"
      data-kind={block.kind}
    >
      <div className="flex flex-wrap items-center gap-2">
        <button
          type="button"
          ref={setActivatorNodeRef}
          {...attributes}
          {...listeners}
          // Without touch-action: none a touch or pen drag on the handle scrolls the page instead of moving the block.
          className="cursor-grab touch-none rounded-md border border-line px-2 py-1 text-ink-soft active:cursor-grabbing"
          aria-label={`Move block ${index + 1}, ${BLOCK_LABEL[block.kind]}`}
        >
          ⠿
        </button>
        <span className="font-medium">
          {index + 1}. {BLOCK_LABEL[block.kind]}
        </span>
        <span className="num hidden flex-1 truncate text-sm text-ink-soft sm:block">
          {Object.keys(props.errors).some((k) => k.startsWith(`${prefix}.`) && props.errors[k])
            ? ""
            : safeDescribe(block)}
        </span>
        <span className="ml-auto flex gap-1">
          <button
            type="button"
            onClick={() => props.onMove(-1)}
            disabled={index === 0}
            className={buttonClass("ghost", "px-2 py-1")}
            aria-label={`Move block ${index + 1} up`}
          >
            ↑
          </button>
          <button
            type="button"
            onClick={() => props.onMove(1)}
            disabled={index === props.count - 1}
            className={buttonClass("ghost", "px-2 py-1")}
            aria-label={`Move block ${index + 1} down`}
          >
            ↓
          </button>
          <button
            type="button"
            onClick={props.onDuplicate}
            className={buttonClass("ghost", "px-2 py-1")}
            aria-label={`Duplicate block ${index + 1}`}
          >
            Copy
          </button>
          <button
            type="button"
            onClick={props.onRemove}
            className={buttonClass("ghost", "px-2 py-1 text-brick")}
            aria-label={`Delete block ${index + 1}`}
          >
            Delete
          </button>
        </span>
      </div>
      <div className="mt-3 grid grid-cols-2 gap-3 sm:grid-cols-4">
        <BlockFields block={block} onChange={props.onChange} err={err} label={`Block ${index + 1}`} />
      </div>
    </li>
  );
}

function safeDescribe(b: Block) {
  try {
    return describeBlock(b);
  } catch {
    return "";
  }
}
