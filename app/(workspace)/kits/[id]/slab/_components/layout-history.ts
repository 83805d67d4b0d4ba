import type { PlacedPiece } from "@/lib/geometry/build-plate";
import type { Placement } from "@/lib/geometry/options";

/**
 * Hand placements with undo and redo, without React. `present` undefined is the automatic layout;
 * `past` holds earlier layouts (newest last), `future` the undone ones (next first).
 */
export type Layout = Placement[] | undefined;
export type LayoutHistory = { past: Layout[]; present: Layout; future: Layout[] };
export type LayoutAction = { type: "place"; layout: Layout } | { type: "undo" } | { type: "redo" } | { type: "replace"; layout: Layout };

/** How many earlier layouts are kept. */
export const HISTORY_LIMIT = 50;

export const EMPTY_HISTORY: LayoutHistory = { past: [], present: undefined, future: [] };

const keep = (past: Layout[]) => past.slice(-HISTORY_LIMIT);

export function layoutHistory(h: LayoutHistory, a: LayoutAction): LayoutHistory {
  switch (a.type) {
    // A move (or going back to automatic) is a step of its own and drops what was undone.
    case "place":
      return { past: keep([...h.past, h.present]), present: a.layout, future: [] };
    case "undo":
      if (!h.past.length) return h;
      return { past: h.past.slice(0, -1), present: h.past[h.past.length - 1], future: [h.present, ...h.future] };
    case "redo":
      if (!h.future.length) return h;
      return { past: keep([...h.past, h.present]), present: h.future[0], future: h.future.slice(1) };
    // A new set of options (a template applied) starts from the automatic layout without a step.
    case "replace":
      return { ...h, present: a.layout };
  }
}

/**
 * Every piece where the last build put it, one of them moved by dx, dy (mm) and turned by `turn`
 * degrees: the hand layout after a drag, an arrow key or a turn.
 */
export function movedPlacements(
  pieces: Pick<PlacedPiece, "number" | "slot" | "x" | "y" | "rotation">[],
  number: number,
  dx: number,
  dy: number,
  turn = 0,
): Placement[] {
  return pieces.map((p) =>
    p.number === number
      ? { piece: p.slot, x: p.x + dx, y: p.y + dy, rotation: p.rotation + turn }
      : { piece: p.slot, x: p.x, y: p.y, rotation: p.rotation },
  );
}
