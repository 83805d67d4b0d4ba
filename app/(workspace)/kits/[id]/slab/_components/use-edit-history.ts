import { useCallback, useEffect, useReducer, useState } from "react";
import { editHistory, historyOf, type History, type HistoryAction } from "./layout-history";

/**
 * The editor's undo and redo over whole states (options and hand layout): Ctrl+Z (⌘Z) undoes, Ctrl+Y
 * or Ctrl+Shift+Z redoes, except while typing in a field (the field's own undo wins there).
 * `beforeUndo` runs first, so an edit still waiting to become a step (typing) is one before it goes.
 * `restores` counts undos and redos, so the form is put back only then (not after its own steps).
 */
export function useEditHistory<T>(initial: () => T, beforeUndo?: () => void) {
  const [h, dispatch] = useReducer(editHistory<T>, undefined, () => historyOf(initial())) as [History<T>, (a: HistoryAction<T>) => void];
  const step = useCallback((state: T) => dispatch({ type: "step", state }), []);
  const replace = useCallback((state: T) => dispatch({ type: "replace", state }), []);
  const [restores, setRestores] = useState(0);
  const undo = useCallback(() => {
    beforeUndo?.();
    dispatch({ type: "undo" });
    setRestores((n) => n + 1);
  }, [beforeUndo]);
  const redo = useCallback(() => {
    dispatch({ type: "redo" });
    setRestores((n) => n + 1);
  }, []);

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

  return { present: h.present, restores, canUndo: h.past.length > 0, canRedo: h.future.length > 0, step, replace, undo, redo };
}
