import { useRouter } from "next/navigation";
import { useCallback, useEffect, useRef, useState } from "react";
import { useToast } from "@/app/_components/toasts";
import { makePlateAction } from "../../../actions";
import { watchPlate } from "./plate-status";

export type Making = { plateId?: string; progress: number; status: string; message?: string };
export type MakePlateInput = Parameters<typeof makePlateAction>[0];

/**
 * "Make the plate": the server action queues the build, then the plate's status is followed until it
 * is done or failed (or the status is lost). Leaving the editor stops following it; the plate is
 * still made and listed under Plates. `busy` while a plate is on its way.
 */
export function useMakePlate() {
  const toast = useToast();
  const router = useRouter();
  const [making, setMaking] = useState<Making | null>(null);
  const run = useRef<AbortController | null>(null);
  useEffect(() => () => run.current?.abort(), []);

  /** `pieces`: how many pieces the preview showed, for the message when the plate is made. */
  const make = useCallback(
    async (input: MakePlateInput, pieces?: number) => {
      run.current?.abort();
      const ctl = new AbortController();
      run.current = ctl;
      const { signal } = ctl;
      setMaking({ progress: 0, status: "queued" });
      let r: Awaited<ReturnType<typeof makePlateAction>>;
      try {
        r = await makePlateAction(input);
      } catch {
        if (signal.aborted) return;
        toast("problem", "The plate was not made: the server could not be reached. Try again.");
        return setMaking({ progress: 0, status: "failed", message: "The server could not be reached; try again in a moment." });
      }
      if (signal.aborted) return;
      if (!r.ok) {
        toast("problem", `The plate was not made: ${r.message}`);
        return setMaking({ progress: 0, status: "failed", message: r.message });
      }
      const plateId = r.data.plateId;
      const end = await watchPlate(plateId, {
        signal,
        onStatus: (job) => setMaking({ plateId, progress: job.progress, status: job.status, message: job.error?.message }),
      });
      switch (end.kind) {
        case "stopped":
          return;
        case "lost":
          toast("problem", "Lost track of the plate being made; it is listed under Plates when it is done.");
          return setMaking({ plateId, progress: 0, status: "failed", message: end.reason });
        case "done":
          toast("done", `Plate made: ${pieces ?? ""} pieces on one slab. Both files are ready to download.`);
          return router.refresh();
        case "failed":
          toast("problem", `The plate could not be made: ${end.job.error?.message ?? "the build failed"}`);
          return router.refresh();
      }
    },
    [toast, router],
  );

  const busy = making !== null && making.status !== "done" && making.status !== "failed";
  return { making, busy, make };
}
