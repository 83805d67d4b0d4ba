/**
 * The proof of a plate (lib/proof) against the build it checks, measured in one run on the 24-piece
 * bench kit: buildPlate with both files (STL, 3MF deflated by node:zlib as the worker does), then the
 * proof of those bytes (3MF inflated by node:zlib, as the worker does). Prints both times, the
 * proof's own stages and the ratio (target ≤ 0.15).
 *   npx tsx bench/proof.ts
 */
import { deflateRawSync, inflateRawSync } from "node:zlib";
import { buildPlate } from "../lib/geometry/build-plate";
import { loadKernel } from "../lib/geometry/kernel";
import { parseOptions } from "../lib/geometry/options";
import { fillValue, provePlate } from "../lib/proof";
import { BENCH_OPTIONS, benchFonts, benchParts } from "./kit";

const kernel = await loadKernel();
const fonts = benchFonts();
const parts = benchParts();
const options = parseOptions(BENCH_OPTIONS);
const build = () => buildPlate(kernel, { parts, options, fonts, formats: ["stl", "3mf"], deflateRaw: (d) => deflateRawSync(d, { level: 1 }) });
const prove = (r: ReturnType<typeof build>) =>
  provePlate({
    stl: r.stl!,
    threeMf: r.threeMf!,
    inflateRaw: (d, size) => inflateRawSync(d, size ? { chunkSize: Math.max(64, size + 1) } : {}),
    options,
    pieces: r.pieces.length,
    qrValue: fillValue(options.marks.qr!.value, {}),
    marks: r.layout!.marks,
    labels: r.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
  });

// Warm-up (JIT), not timed.
prove(build());

const runs = 3;
let bestBuild = Infinity, bestProof = Infinity, bestRatio = Infinity;
let last: ReturnType<typeof prove> | undefined;
for (let i = 0; i < runs; i++) {
  let t = performance.now();
  const r = build();
  const buildMs = performance.now() - t;
  t = performance.now();
  last = prove(r);
  const proofMs = performance.now() - t;
  if (!last.ok) throw new Error(`the bench plate failed its proof: ${last.summary}`);
  bestBuild = Math.min(bestBuild, buildMs);
  bestProof = Math.min(bestProof, proofMs);
  bestRatio = Math.min(bestRatio, proofMs / buildMs);
  console.log(`run ${i + 1}: build ${buildMs.toFixed(0)} ms, proof ${proofMs.toFixed(0)} ms, ratio ${(proofMs / buildMs).toFixed(3)}`);
}
console.log("proof stages (last run, ms):", last!.timings);
console.log(last!.summary);
console.log(`build ${bestBuild.toFixed(0)} ms, proof ${bestProof.toFixed(0)} ms (best of ${runs}); best ratio in one run ${bestRatio.toFixed(3)} (target ≤ 0.15)`);
