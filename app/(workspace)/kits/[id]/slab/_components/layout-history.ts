import type { PlacedPiece } from "@/lib/geometry/build-plate";
import type { Placement } from "@/lib/geometry/options";

/**
 * The editor's undo and redo, without React: a history of states (the options form's values and
 * the hand placements), `past` holding earlier states (newest last), `future` the undone ones (next
 * first). A layout `undefined` is the automatic layout.
 */
export type Layout = Placement[] | undefined;
export type History<T> = { past: T[]; present: T; future: T[] };
export type HistoryAction<T> = { type: "step"; state: T } | { type: "undo" } | { type: "redo" } | { type: "replace"; state: T };

/** How many earlier states are kept. */
export const HISTORY_LIMIT = 50;

export const historyOf = <T>(present: T): History<T> => ({ past: [], present, future: [] });

const keep = <T>(past: T[]) => past.slice(-HISTORY_LIMIT);

export function editHistory<T>(h: History<T>, a: HistoryAction<T>): History<T> {
  switch (a.type) {
    // An edit (a move, a field changed, going back to automatic) is a step of its own and drops what was undone.
    case "step":
      return { past: keep([...h.past, h.present]), present: a.state, future: [] };
    case "undo":
      if (!h.past.length) return h;
      return { past: h.past.slice(0, -1), present: h.past[h.past.length - 1]!, future: [h.present, ...h.future] };
    case "redo":
      if (!h.future.length) return h;
      return { past: keep([...h.past, h.present]), present: h.future[0]!, future: h.future.slice(1) };
    // A new start (a template applied) replaces the state without a step.
    case "replace":
      return { ...h, present: a.state };
  }
}

/**
 * Every piece where the last build put it, the one in kit slot `slot` moved by dx, dy (mm) and
 * turned by `turn` degrees: the hand layout after a drag, an arrow key or a turn. By slot, not by
 * number: numbers follow the pieces' places and change when a piece moves.
 */
export function movedPlacements(
  pieces: Pick<PlacedPiece, "slot" | "x" | "y" | "rotation">[],
  slot: number,
  dx: number,
  dy: number,
  turn = 0,
): Placement[] {
  return pieces.map((p) =>
    p.slot === slot
      ? { piece: p.slot, x: p.x + dx, y: p.y + dy, rotation: p.rotation + turn }
      : { piece: p.slot, x: p.x, y: p.y, rotation: p.rotation },
  );
}
