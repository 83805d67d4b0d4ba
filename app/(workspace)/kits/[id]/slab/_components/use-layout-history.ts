import { useCallback, useEffect, useReducer } from "react";
import { EMPTY_HISTORY, layoutHistory, type Layout } from "./layout-history";

/**
 * The plate map's hand layout with undo and redo: Ctrl+Z (⌘Z) undoes, Ctrl+Y or Ctrl+Shift+Z redoes,
 * except while typing in a field (the field's own undo wins there). `automatic()` goes back to the
 * engine's layout as a step that can be undone; `replace()` sets a layout without a step.
 */
export function useLayoutHistory() {
  const [h, dispatch] = useReducer(layoutHistory, EMPTY_HISTORY);
  const place = useCallback((layout: Layout) => dispatch({ type: "place", layout }), []);
  const undo = useCallback(() => dispatch({ type: "undo" }), []);
  const redo = useCallback(() => dispatch({ type: "redo" }), []);
  const automatic = useCallback(() => dispatch({ type: "place", layout: undefined }), []);
  const replace = useCallback((layout: Layout) => dispatch({ type: "replace", layout }), []);

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (!(e.ctrlKey || e.metaKey) || (e.target instanceof Element && e.target.closest("input, select, textarea"))) return;
      const key = e.key.toLowerCase();
      if (key === "z" && !e.shiftKey) {
        e.preventDefault();
        undo();
      } else if (key === "y" || (key === "z" && e.shiftKey)) {
        e.preventDefault();
        redo();
      }
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, [undo, redo]);

  return { placements: h.present, canUndo: h.past.length > 0, canRedo: h.future.length > 0, place, undo, redo, automatic, replace };
}
