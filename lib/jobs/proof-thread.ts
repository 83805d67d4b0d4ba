import { Worker } from "node:worker_threads";
import type { WeldedStl } from "@/lib/proof/stl";
import { ThreeMfProofError, type ThreeMfRead } from "@/lib/proof/three-mf";
import type { EdgeReport } from "@/lib/proof/topology";

/**
 * A plate's proof on two threads: the calling thread checks the STL while this second thread
 * (proof-thread-worker.ts) reads the 3MF and counts the STL's edges. One second thread per calling
 * thread, started on first use, held (ref) only while it has work; one that dies fails the tasks it
 * had and the next task starts a fresh one.
 */
let thread: Worker | null = null;
let nextId = 1;
const waiting = new Map<number, { resolve: (r: never) => void; reject: (e: Error) => void }>();

function start(): Worker {
  const w = new Worker(new URL("./proof-thread-entry.mjs", import.meta.url));
  w.unref();
  w.on("message", (m: { id: number; result?: unknown; error?: string; proofError?: boolean }) => {
    const p = waiting.get(m.id);
    if (!p) return;
    waiting.delete(m.id);
    if (waiting.size === 0) w.unref();
    if (m.error === undefined) p.resolve(m.result as never);
    else p.reject(m.proofError ? new ThreeMfProofError(m.error) : new Error(m.error));
  });
  const fail = (err: Error) => {
    if (thread === w) thread = null;
    for (const p of waiting.values()) p.reject(err);
    waiting.clear();
  };
  w.on("error", fail);
  w.on("exit", (code) => fail(new Error(`the proof's second thread stopped (exit ${code})`)));
  return w;
}

function send<T>(message: Record<string, unknown>): Promise<T> {
  thread ??= start();
  const w = thread;
  const id = nextId++;
  return new Promise<T>((resolve, reject) => {
    waiting.set(id, { resolve: resolve as (r: never) => void, reject });
    w.ref();
    // Copies: the caller keeps its arrays (the files are stored after the proof; the mesh is checked on).
    w.postMessage({ id, ...message });
  });
}

/** A 3MF package's build read (readThreeMfBodies) on the second thread; rejects with ThreeMfProofError as it throws. */
export function readThreeMfOffThread(bytes: Uint8Array): Promise<ThreeMfRead> {
  return send({ task: "3mf", bytes });
}

/** A welded STL's edges counted (edgeReport) on the second thread. */
export function countEdgesOffThread(mesh: WeldedStl): Promise<EdgeReport> {
  return send({ task: "edges", triangles: mesh.triangles, positions: mesh.positions, tris: mesh.tris });
}

/** End the second thread (a test or a bench at its end). */
export async function stopProofThread(): Promise<void> {
  const w = thread;
  thread = null;
  if (w) await w.terminate();
}
