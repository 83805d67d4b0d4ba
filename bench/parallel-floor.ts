/**
 * What two build threads can do on this machine with nothing else running: the demo kit built back
 * to back in one thread, then in two threads at once (each with its own kernel), with no server,
 * database or queue in the way. ceiling = (builds/min with 2 threads) ÷ (2 × builds/min with 1) is the
 * most any pool efficiency can reach here; bench/api.ts prints it beside its own figure.
 *   npx tsx bench/parallel-floor.ts
 */
import { isMainThread, parentPort, Worker, workerData } from "node:worker_threads";
import { deflateRawSync } from "node:zlib";
import { buildPlate, newPartCache } from "../lib/geometry/build-plate";
import { DEMO_PAWN_SEGMENTS, hexTile, pawn } from "../lib/geometry/demo-shapes";
import { loadKernel } from "../lib/geometry/kernel";
import { orientMesh } from "../lib/geometry/orient";
import { benchFonts } from "./kit";

export const ORDER_OPTIONS = { marks: { text: [{ value: "ORDER {order}" }, { value: "Thank you!", size: 4 }] } };
export const deflateRaw = (d: Uint8Array) => deflateRawSync(d, { level: 1 });

/** Build the demo kit n times, each with its own order number; returns builds per minute. */
export async function buildLoop(n: number, offset = 0): Promise<number> {
  const kernel = await loadKernel();
  const fonts = benchFonts();
  const parts = [
    { id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 4 },
    { id: "pawn", name: "Beacon pawn", mesh: orientMesh(pawn(DEMO_PAWN_SEGMENTS)), quantity: 2 },
  ];
  const cache = newPartCache(); // as the worker threads keep one
  const one = (i: number) =>
    buildPlate(kernel, {
      parts,
      fonts,
      formats: ["stl", "3mf"],
      cache,
      options: ORDER_OPTIONS,
      variables: { order: String(10000 + offset + i) },
      deflateRaw,
    });
  for (let i = 0; i < 3; i++) one(-1 - i); // warm-up: JIT, kernel, part measures
  const t0 = performance.now();
  for (let i = 0; i < n; i++) one(i);
  return n / ((performance.now() - t0) / 60_000);
}

export async function parallelCeiling(n: number): Promise<{ one: number; two: number; ceiling: number }> {
  const one = await buildLoop(n);
  const url = new URL(import.meta.url);
  const run = (offset: number) =>
    new Promise<number>((resolve, reject) => {
      // The thread registers tsx's loader itself, then loads this file (as the build threads do).
      const code = `import("tsx/esm/api").then((m) => { m.register(); return import(${JSON.stringify(url.href)}); });`;
      const w = new Worker(code, { eval: true, workerData: { n, offset } });
      w.once("message", resolve);
      w.once("error", reject);
    });
  const [a, b] = await Promise.all([run(1000), run(2000)]);
  const two = a + b;
  return { one, two, ceiling: two / (2 * one) };
}

if (!isMainThread && workerData) {
  const { n, offset } = workerData as { n: number; offset: number };
  parentPort!.postMessage(await buildLoop(n, offset));
} else if (isMainThread && process.argv[1] && import.meta.url.endsWith(process.argv[1].split("/").pop()!)) {
  const r = await parallelCeiling(Number(process.env.SLAB_BENCH_PLATES ?? 30));
  console.log(
    `in-process, 1 thread: ${r.one.toFixed(0)} builds/min; 2 threads at once: ${r.two.toFixed(0)} builds/min; ceiling ` +
      `${r.ceiling.toFixed(2)}`,
  );
}
