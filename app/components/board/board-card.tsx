import { useDraggable } from "@dnd-kit/core";
import { ProfileMarks } from "~/components/session-profile";
import type { BoardItem, BoardShape } from "~/lib/board";
import { formatMinutes } from "~/lib/duration";

export const CARD_PROFILE_HEIGHT = 18;
const shapeId = (k: number) => `bs${k}`;
/** dnd-kit's id for a card on the board (shelf sessions are `shelf:<id>`). */
export const itemKey = (id: number) => `item:${id}`;

/**
 * Each distinct profile is drawn once, as a symbol; the cards reuse it. A year's board holds hundreds of cards but
 * only a few different sessions, and each profile is a dozen shapes.
 */
export function ShapeDefs({ shapes }: { shapes: BoardShape[] }) {
  return (
    <svg aria-hidden="true" className="absolute h-0 w-0 overflow-hidden">
      <defs>
        {shapes.map((sh, k) => (
          <symbol key={k} id={shapeId(k)} viewBox={`0 0 300 ${CARD_PROFILE_HEIGHT}`} preserveAspectRatio="none">
            <ProfileMarks steps={sh.steps} height={CARD_PROFILE_HEIGHT} />
          </symbol>
        ))}
      </defs>
    </svg>
  );
}

export function ShapeUse({ shape }: { shape: number }) {
  if (shape < 0) return <div className="mt-1" style={{ height: CARD_PROFILE_HEIGHT }} />;
  return (
    <svg className="bc-profile" aria-hidden="true">
      <use href={`#${shapeId(shape)}`} />
    </svg>
  );
}

export function CardBody({
  name,
  durationS,
  profile,
  test,
  time,
  note,
  lifted,
}: {
  name: string;
  durationS: number;
  profile: React.ReactNode;
  test?: boolean;
  time?: string | null;
  note?: boolean;
  lifted?: boolean;
}) {
  return (
    <div className={lifted ? "bc bc-lifted" : "bc"}>
      <div className="bc-head">
        <span>{name}</span>
        <span>{formatMinutes(durationS)}</span>
      </div>
      {profile}
      {(test || time || note) && (
        <div className="bc-tags">
          {test && <span className="bg-brick/15 text-brick">field test</span>}
          {note && <span className="bg-teal/10 text-teal-dark">note</span>}
          {time && <span className="num bg-paper-deep">{time}</span>}
        </div>
      )}
    </div>
  );
}

export function BoardCard({ item, selected, onSelect }: { item: BoardItem; selected: boolean; onSelect: () => void }) {
  const { attributes, listeners, setNodeRef } = useDraggable({
    id: itemKey(item.id),
    disabled: item.id < 0,
  });
  return (
    <button
      ref={setNodeRef}
      type="button"
      {...attributes}
      {...listeners}
      onClick={onSelect}
      aria-pressed={selected}
      aria-label={`${item.name}, ${formatMinutes(item.durationS)}`}
      data-testid="board-item"
      data-card-id={item.id}
      className={selected ? "bc-button ring-2 ring-teal" : "bc-button"}
    >
      <CardBody
        name={item.name}
        durationS={item.durationS}
        profile={<ShapeUse shape={item.shape} />}
        test={item.test}
        time={item.timeOfDay}
        note={Boolean(item.notes)}
      />
    </button>
  );
}
