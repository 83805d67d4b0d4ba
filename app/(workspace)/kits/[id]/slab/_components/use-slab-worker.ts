import { useEffect, useRef, useState } from "react";
import type { SlabOptionsInput } from "@/lib/geometry/options";
import { mergePreview, type Preview } from "./preview";
import type { DisplayPart, EditorPart, FromWorker, ToWorker } from "./protocol";

export type EngineReady = { ms: number; triangles: number; parts: DisplayPart[] };

/**
 * The engine in a browser Web Worker (slab.worker.ts, protocol.ts): started once per set of parts,
 * sent every valid change of options and values, answering with the preview. Only the newest
 * request's answer is shown (each carries its sequence number). Timings: the worker's build time
 * (`preview.ms`) and `latency`, from sending a change to the animation frame after its answer.
 */
export function useSlabWorker(parts: EditorPart[], options: SlabOptionsInput, variables: Record<string, string>, valid: boolean) {
  const [ready, setReady] = useState<EngineReady | null>(null);
  const [preview, setPreview] = useState<Preview | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [latency, setLatency] = useState<number | null>(null);
  const worker = useRef<Worker | null>(null);
  const seq = useRef(0);
  const sentAt = useRef(new Map<number, number>());
  const latest = useRef<{ options: SlabOptionsInput; variables: Record<string, string> } | null>(null);

  const send = (w: Worker, request: { options: SlabOptionsInput; variables: Record<string, string> }) => {
    const n = ++seq.current;
    sentAt.current.set(n, performance.now());
    w.postMessage({ type: "build", seq: n, ...request } satisfies ToWorker);
  };

  // Restart only when the parts themselves change, not when a refresh hands over an equal list.
  const partsKey = JSON.stringify(parts);
  useEffect(() => {
    const w = new Worker(new URL("./slab.worker.ts", import.meta.url), { type: "module" });
    worker.current = w;
    w.onmessage = (e: MessageEvent<FromWorker>) => {
      const m = e.data;
      if (m.type === "ready") setReady({ ms: m.ms, triangles: m.triangles, parts: m.parts });
      else if (m.type === "error") setProblem(m.message);
      else if (m.seq === seq.current) {
        setProblem(null);
        setPreview((prev) => mergePreview(prev, m));
        const t = sentAt.current.get(m.seq);
        for (const k of sentAt.current.keys()) if (k <= m.seq) sentAt.current.delete(k);
        // Option change → frame: measured to the next animation frame after the new meshes arrive.
        if (t !== undefined) requestAnimationFrame(() => setLatency(performance.now() - t));
      }
    };
    w.postMessage({ type: "init", parts: JSON.parse(partsKey) as EditorPart[] } satisfies ToWorker);
    // A new worker (new parts) builds the options in use at once; the first one is sent below.
    if (latest.current) send(w, latest.current);
    return () => {
      w.terminate();
      if (worker.current === w) worker.current = null;
    };
  }, [partsKey]);

  useEffect(() => {
    if (!valid) return;
    latest.current = { options, variables };
    if (worker.current) send(worker.current, latest.current);
  }, [options, variables, valid]);

  return { ready, preview, problem, latency };
}
