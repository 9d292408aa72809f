import type { Activators, SensorInstance, SensorProps } from "@dnd-kit/core";

type Coordinates = { x: number; y: number };
import type { KeyboardEvent as ReactKeyboardEvent } from "react";

export type StepKey = "up" | "down" | "left" | "right";
export interface StepKeyboardOptions {
  /**
   * Moves the drop target one step; returns false when there is nowhere to go in that direction, or where the
   * dragged element should now be drawn (its offset from where it started) when the caller wants it to follow.
   */
  step: (key: StepKey) => boolean | Coordinates;
}

const KEYS: Record<string, StepKey> = { ArrowUp: "up", ArrowDown: "down", ArrowLeft: "left", ArrowRight: "right" };

/**
 * A keyboard sensor that moves the drop target through a model (days, weeks, positions in a list) rather than
 * through screen geometry. dnd-kit's own keyboard sensor steps by measured rectangles: it cannot start from an item
 * that is not itself a drop target (the shelf), and it scrolls containers on its own, which lets a horizontal step
 * land in whichever column is nearest. Here the caller owns the target; the sensor only reports key presses and
 * nudges the drag's coordinates so dnd-kit recomputes `over` and announces the move.
 */
export class StepKeyboardSensor implements SensorInstance {
  autoScrollEnabled = false;
  private moves = 0;
  private readonly doc: Document;
  private readonly props: SensorProps<StepKeyboardOptions>;

  static activators: Activators<StepKeyboardOptions> = [
    {
      eventName: "onKeyDown",
      handler: (event: ReactKeyboardEvent, _options, { active }) => {
        if (event.code !== "Space" && event.code !== "Enter") return false;
        // Only the element that carries the listeners starts a drag, never a button or field inside it.
        if (active.activatorNode.current && event.target !== active.activatorNode.current) return false;
        event.preventDefault();
        return true;
      },
    },
  ];

  constructor(props: SensorProps<StepKeyboardOptions>) {
    this.props = props;
    this.doc = (props.event.target as Node | null)?.ownerDocument ?? document;
    props.onStart({ x: 0, y: 0 });
    // Listening at once (not from the next task) so a quick key press after the pick-up is not lost; the press that
    // started the drag may still bubble up to the document, and is skipped there.
    this.doc.addEventListener("keydown", this.onKeyDown);
    window.addEventListener("resize", this.cancel);
  }

  private detach() {
    this.doc.removeEventListener("keydown", this.onKeyDown);
    window.removeEventListener("resize", this.cancel);
  }

  private cancel = () => {
    this.detach();
    this.props.onCancel();
  };

  private onKeyDown = (event: KeyboardEvent) => {
    if (event === this.props.event) return;
    if (event.code === "Space" || event.code === "Enter") {
      event.preventDefault();
      this.detach();
      this.props.onEnd();
      return;
    }
    if (event.code === "Escape") {
      event.preventDefault();
      this.cancel();
      return;
    }
    const key = KEYS[event.code];
    if (!key) return;
    event.preventDefault();
    const moved = this.props.options.step(key);
    if (moved) this.props.onMove(moved === true ? { x: ++this.moves, y: 0 } : moved);
  };
}
