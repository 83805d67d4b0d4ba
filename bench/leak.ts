/**
 * 200 builds of a 6-piece plate in one process: kernel objects alive after each build must be 0, and
 * resident memory after build 20 within 10 % of after build 200 (the WASM heap never shrinks, so a
 * leak shows as steady growth).
 *   npx tsx bench/leak.ts
 */
import { buildPlate } from "../lib/geometry/build-plate";
import { hexTile, pawn } from "../lib/geometry/demo-shapes";
import { loadKernel } from "../lib/geometry/kernel";
import { orientMesh } from "../lib/geometry/orient";
import { BENCH_OPTIONS, benchFonts } from "./kit";

const kernel = await loadKernel();
const fonts = benchFonts();
const parts = [
  { id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 4 },
  { id: "pawn", name: "Beacon pawn", mesh: orientMesh(pawn(256)), quantity: 2 },
];
const builds = Number(process.argv[2] ?? 200);
let rss20 = 0;
let maxLive = 0;
const started = performance.now();
for (let i = 1; i <= builds; i++) {
  const r = buildPlate(kernel, { parts, options: BENCH_OPTIONS, fonts, formats: ["stl", "3mf"], variables: { order: String(10000 + i) } });
  if (!r.stl || !r.threeMf) throw new Error(`build ${i} made no files: ${JSON.stringify(r.findings)}`);
  maxLive = Math.max(maxLive, kernel.live());
  if (i === 20) rss20 = process.memoryUsage().rss;
  if (i % 50 === 0) console.log(`build ${i}: rss ${(process.memoryUsage().rss / 1e6).toFixed(0)} MB, live kernel objects ${kernel.live()}`);
}
const rssEnd = process.memoryUsage().rss;
console.log(`${builds} builds in ${((performance.now() - started) / 1000).toFixed(1)} s`);
console.log(`live kernel objects after any build: max ${maxLive} (target 0)`);
console.log(
  `rss after build 20 ${(rss20 / 1e6).toFixed(0)} MB, after build ${builds} ${(rssEnd / 1e6).toFixed(0)} MB, ratio ` +
    `${(rssEnd / rss20).toFixed(3)} (target ≤ 1.10)`,
);
