import type { Announcements, UniqueIdentifier } from "@dnd-kit/core";

/** What a screen reader hears before a drag: how to move a card by keyboard. */
export const SCREEN_READER_INSTRUCTIONS = {
  draggable:
    "To move this session with the keyboard, press Space, then the arrow keys: up and down through the days, left and right between weeks. Space drops it, Escape cancels.",
};

/**
 * The live-region words for a drag. dnd-kit calls them between renders, so they ask the drag for its state when
 * called: the session's name, whether the keyboard carries it, where it would land now, and the words the drop
 * decided on; `isNew` keeps a move over the same place from being said twice. A hook in name only (it keeps no
 * state): the hooks lint then lets the callbacks read the drag's refs.
 */
export function useDragAnnouncements(drag: {
  nameOf: (id: UniqueIdentifier) => string;
  viaKeyboard: () => boolean;
  where: () => string;
  isNew: (words: string) => boolean;
  finalWords: () => string;
}): Announcements {
  const { nameOf, viaKeyboard, where, isNew, finalWords } = drag;
  return {
    onDragStart: ({ active }) =>
      viaKeyboard()
        ? `Picked up ${nameOf(active.id)}, now over ${where()}. Up and down arrows move it through the days, left and right to the same day of another week; Space drops it, Escape cancels.`
        : `Picked up ${nameOf(active.id)}.`,
    onDragMove: ({ active }) => {
      const words = `${nameOf(active.id)} is over ${where()}.`;
      return isNew(words) ? words : undefined;
    },
    onDragOver: () => undefined,
    onDragEnd: () => finalWords(),
    onDragCancel: ({ active }) => `Cancelled. ${nameOf(active.id)} stays where it was.`,
  };
}
