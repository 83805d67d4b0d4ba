/**
 * The proof of a plate (lib/proof) against the build it checks, measured in one run on the 24-piece
 * bench kit: buildPlate with both files (STL, 3MF deflated by node:zlib as the worker does), then the
 * proof of those bytes as the worker runs it (provePlateAsync on two threads: the 3MF read and the
 * STL's edges counted on the proof's second thread while the rest of the STL is checked), and the same
 * proof on one thread (provePlate, node:zlib's inflateRawSync). Prints the times, the proof's own
 * stages and the ratios (target ≤ 0.15), and beside them the CPU the proof spends on all its threads
 * against the build's (what it costs a worker whose cores are all busy).
 *   npx tsx bench/proof.ts
 */
import { deflateRawSync, inflateRaw, inflateRawSync } from "node:zlib";
import { buildPlate, newPartCache } from "../lib/geometry/build-plate";
import { loadKernel } from "../lib/geometry/kernel";
import { parseOptions } from "../lib/geometry/options";
import { fillValue, provePlate, provePlateAsync, type Proof, type ProofInput } from "../lib/proof";
import { countEdgesOffThread, readThreeMfOffThread } from "../lib/jobs/proof-thread";
import { BENCH_OPTIONS, benchFonts, benchParts } from "./kit";

const kernel = await loadKernel();
const fonts = benchFonts();
const parts = benchParts();
const options = parseOptions(BENCH_OPTIONS);
const build = () =>
  buildPlate(kernel, { parts, options, fonts, formats: ["stl", "3mf"], deflateRaw: (d) => deflateRawSync(d, { level: 1 }) });
// One output buffer of the size the zip directory states (one byte more, so zlib ends there).
const chunk = (size?: number) => (size ? { chunkSize: Math.max(64, size + 1) } : {});
const input = (r: ReturnType<typeof build>): ProofInput => ({
  stl: r.stl!,
  threeMf: r.threeMf!,
  inflateRaw: (d, size) => inflateRawSync(d, chunk(size)),
  readThreeMf: readThreeMfOffThread,
  countEdges: countEdgesOffThread,
  inflateRawAsync: (d, size) =>
    new Promise((resolve, reject) => inflateRaw(d, chunk(size), (err, out) => (err ? reject(err) : resolve(out)))),
  options,
  pieces: r.pieces.length,
  qrValue: fillValue(options.marks.qr!.value, {}),
  marks: r.layout!.marks,
  labels: r.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
});

// Warm-up (JIT), not timed: one build and one proof.
await provePlateAsync(input(build()));

const runs = 3;
const best = { build: Infinity, proof: Infinity, ratio: Infinity, sync: Infinity, syncRatio: Infinity, cpuRatio: Infinity };
const cpuMs = (u: NodeJS.CpuUsage) => (u.user + u.system) / 1000;
let last: Proof | undefined, lastSync: Proof | undefined;
let lastPlate: ReturnType<typeof build> | undefined;
let lastBuild = 0;
for (let i = 0; i < runs; i++) {
  let t = performance.now();
  let cpu = process.cpuUsage();
  const r = build();
  const buildMs = performance.now() - t;
  const buildCpu = cpuMs(process.cpuUsage(cpu));
  t = performance.now();
  cpu = process.cpuUsage();
  last = await provePlateAsync(input(r));
  const proofMs = performance.now() - t;
  const proofCpu = cpuMs(process.cpuUsage(cpu));
  best.cpuRatio = Math.min(best.cpuRatio, proofCpu / buildCpu);
  if (!last.ok) throw new Error(`the bench plate failed its proof: ${last.summary}`);
  lastPlate = r;
  lastBuild = buildMs;
  best.build = Math.min(best.build, buildMs);
  best.proof = Math.min(best.proof, proofMs);
  best.ratio = Math.min(best.ratio, proofMs / buildMs);
  console.log(
    `run ${i + 1}: build ${buildMs.toFixed(0)} ms, proof ${proofMs.toFixed(0)} ms, ratio ${(proofMs / buildMs).toFixed(3)}; ` +
      `CPU on all threads: build ${buildCpu.toFixed(0)} ms, proof ${proofCpu.toFixed(0)} ms, ratio ${(proofCpu / buildCpu).toFixed(3)}`,
  );
}
// The same proof on one thread (provePlate, inflateRawSync), after the runs above: against the last build.
for (let i = 0; i < runs; i++) {
  const t = performance.now();
  lastSync = provePlate(input(lastPlate!));
  const syncMs = performance.now() - t;
  best.sync = Math.min(best.sync, syncMs);
  best.syncRatio = Math.min(best.syncRatio, syncMs / lastBuild);
}
// Against a warm build (the parts' preparations kept, lib/geometry/prepared.ts): what a worker building
// the same kit again pays, where the proof weighs more since measuring the parts is no longer in the build.
const cache = newPartCache();
const warmBuild = () =>
  buildPlate(kernel, { parts, options, fonts, formats: ["stl", "3mf"], cache, deflateRaw: (d) => deflateRawSync(d, { level: 1 }) });
warmBuild();
let warmMs = Infinity;
for (let i = 0; i < runs; i++) {
  const t = performance.now();
  warmBuild();
  warmMs = Math.min(warmMs, performance.now() - t);
}
console.log("proof stages (last run, ms):", last!.timings);
console.log("on one thread (last of its runs, ms):", lastSync!.timings);
console.log(last!.summary);
console.log(
  `build ${best.build.toFixed(0)} ms, proof ${best.proof.toFixed(0)} ms (best of ${runs}); best ratio in one run ` +
    `${best.ratio.toFixed(3)} (target ≤ 0.15); CPU ratio ${best.cpuRatio.toFixed(3)}`,
);
console.log(
  `against the warm build (parts measured once): build ${warmMs.toFixed(0)} ms, proof ${best.proof.toFixed(0)} ms, ratio ` +
    `${(best.proof / warmMs).toFixed(3)}`,
);
console.log(
  `on one thread: proof ${best.sync.toFixed(0)} ms (best of ${runs}), ratio ${best.syncRatio.toFixed(3)} against the last build ` +
    `(${lastBuild.toFixed(0)} ms)`,
);
