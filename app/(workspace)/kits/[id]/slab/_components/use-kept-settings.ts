import { useEffect, useRef, useState } from "react";
import type { KitSlabSettings } from "@/lib/validation/kits";
import { saveSlabSettingsAction } from "../../../actions";

/** `saves`: how many saves the server has taken since the editor opened. */
export type Keeping = { state: "kept" | "keeping" | "failed"; message?: string; saves: number };

/** How long the editor waits after the last change before the kit keeps its settings. */
const PAUSE_MS = 700;

/**
 * The kit keeps its slab settings as the designer works: one save per pause in the edits (and one
 * on leaving the editor while a save waits). `settings` null (the form holds something the engine
 * refuses) keeps the last good settings. Off (`enabled` false) for a role that cannot edit kits.
 */
export function useKeptSettings(kitId: string, settings: KitSlabSettings | null, enabled: boolean): Keeping {
  const [keeping, setKeeping] = useState<Keeping>({ state: "kept", saves: 0 });
  const json = settings ? JSON.stringify(settings) : null;
  const last = useRef(json);
  const waiting = useRef<string | null>(null);

  useEffect(() => {
    if (!enabled || json === null || json === last.current) return;
    waiting.current = json;
    const timer = setTimeout(() => {
      waiting.current = null;
      setKeeping((k) => ({ state: "keeping", saves: k.saves }));
      saveSlabSettingsAction({ kitId, settings: JSON.parse(json) as KitSlabSettings })
        .then((r) => {
          if (r.ok) {
            last.current = json;
            setKeeping((k) => ({ state: "kept", saves: k.saves + 1 }));
          } else setKeeping((k) => ({ state: "failed", message: r.message, saves: k.saves }));
        })
        .catch(() => setKeeping((k) => ({ state: "failed", message: "the server could not be reached", saves: k.saves })));
    }, PAUSE_MS);
    return () => clearTimeout(timer);
  }, [json, kitId, enabled]);

  // Leaving the editor with a save still waiting: send it now.
  useEffect(
    () => () => {
      const pending = waiting.current;
      if (pending) void saveSlabSettingsAction({ kitId, settings: JSON.parse(pending) as KitSlabSettings });
    },
    [kitId],
  );
  return keeping;
}
