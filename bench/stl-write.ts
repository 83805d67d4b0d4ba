/**
 * Binary STL writer throughput against the floor of a plain Buffer.copy of the same size, measured in
 * one run. Prints MB/s for both and the ratio (1.0 would be as fast as copying the bytes).
 */
import { pawn } from "../lib/geometry/demo-shapes";
import { writeBinaryStl } from "../lib/geometry/io/stl-write";
import { triangleCount } from "../lib/geometry/mesh";

const meshes = Array.from({ length: 40 }, () => pawn(512)); // ~1.2 M triangles in all
const n = meshes.reduce((s, m) => s + triangleCount(m), 0);
const bytes = 84 + 50 * n;

function best(fn: () => void, runs = 5): number {
  let min = Infinity;
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    fn();
    min = Math.min(min, performance.now() - t);
  }
  return min;
}

writeBinaryStl(meshes); // warm up
const writeMs = best(() => writeBinaryStl(meshes));
const src = Buffer.alloc(bytes, 1);
const copyMs = best(() => {
  const dst = Buffer.allocUnsafe(bytes);
  src.copy(dst);
});
const mbs = (ms: number) => (bytes / 1e6 / (ms / 1000)).toFixed(0);
console.log(`triangles ${n}, output ${(bytes / 1e6).toFixed(1)} MB`);
console.log(`stl write ${writeMs.toFixed(1)} ms (${mbs(writeMs)} MB/s); buffer copy ${copyMs.toFixed(1)} ms (${mbs(copyMs)} MB/s)`);
console.log(`ratio ${(writeMs / copyMs).toFixed(2)}`);
