/**
 * Nesting by shape against today's rectangle packer, on fixed kits of our own (bench/nesting-kits.ts),
 * each built both ways in one run: slab area, utilisation (the packing footprints' area — each piece's
 * shadow grown by its ring and half the spacing — over the slab's area), the area lower bound (the
 * footprints' area with the margin round their extent's perimeter left out), and the nesting time.
 * Prints the targets beside the ratios.
 *   npx tsx bench/nesting.ts
 */
import ClipperLib from "clipper-lib";
import { buildPlate, type PlateResult } from "../lib/geometry/build-plate";
import { loadKernel } from "../lib/geometry/kernel";
import { parseOptions, type SlabOptionsInput } from "../lib/geometry/options";
import { orientMesh } from "../lib/geometry/orient";
import { planPlates } from "../lib/geometry/plans";
import { benchFonts } from "./kit";
import { mixedKit, nestKits, type NestKit } from "./nesting-kits";

const kernel = await loadKernel();
const fonts = benchFonts();
const SCALE = 1e4;

/** The packing footprints' area, grown with clipper-lib (independent of the engine's kernel). */
function footprintArea(r: PlateResult, options: SlabOptionsInput): number {
  const o = parseOptions(options);
  const ring =
    o.marks.outlines === "ring"
      ? o.marks.ringStyle.clearance + o.marks.ringStyle.width
      : o.marks.outlines === "pocket"
        ? o.marks.ringStyle.clearance
        : 0;
  const by = ring + Math.max(o.layout.spacing, o.nozzle) / 2;
  let sum = 0;
  for (const p of r.pieces) {
    const co = new ClipperLib.ClipperOffset(2, 0.25 * SCALE * 0.01);
    co.AddPaths(
      p.outline.map((c) => c.map(([x, y]) => ({ X: Math.round(x * SCALE), Y: Math.round(y * SCALE) }))),
      ClipperLib.JoinType.jtRound,
      ClipperLib.EndType.etClosedPolygon,
    );
    const out: { X: number; Y: number }[][] = [];
    co.Execute(out, by * SCALE);
    sum += out.reduce((s, q) => s + ClipperLib.Clipper.Area(q), 0) / SCALE ** 2;
  }
  return sum;
}

function polygonArea(contours: [number, number][][]): number {
  let a = 0;
  for (const c of contours) for (let i = 0, j = c.length - 1; i < c.length; j = i++) a += (c[j]![0] - c[i]![0]) * (c[j]![1] + c[i]![1]);
  return a / 2;
}

type Row = { area: number; util: number; ms: number; fits: boolean; w: number; d: number };
function run(kit: NestKit, packing: "boxes" | "shapes", shape: "rounded-rect" | "disc" | "contour"): Row {
  const parts = kit.parts.map((p) => ({ ...p, mesh: orientMesh(p.mesh) }));
  const options: SlabOptionsInput = {
    ...kit.options,
    slab: { ...kit.options.slab, shape },
    layout: { ...kit.options.layout, packing },
  };
  // Twice: the first warms the JIT; the second is timed.
  buildPlate(kernel, { parts, options, fonts });
  const r = buildPlate(kernel, { parts, options, fonts });
  const ms = r.stats.timings.layout ?? NaN;
  if (!r.layout || r.findings.some((f) => f.severity === "error" && f.code !== "small_part")) {
    return { area: NaN, util: NaN, ms, fits: false, w: NaN, d: NaN };
  }
  const area = polygonArea(r.layout.slab.outline);
  return { area, util: footprintArea(r, options) / area, ms, fits: true, w: r.layout.slab.width, d: r.layout.slab.depth };
}

const f1 = (x: number) => (Number.isFinite(x) ? x.toFixed(1) : "—");
const f3 = (x: number) => (Number.isFinite(x) ? x.toFixed(3) : "—");
console.log("kit  outline       packer  slab (mm)        area (mm²)  utilisation  nesting (ms)");
const results = new Map<string, Row>();
for (const kit of nestKits()) {
  console.log(`(${kit.id}) ${kit.title}`);
  for (const shape of ["rounded-rect", "contour", "disc"] as const) {
    for (const packing of ["boxes", "shapes"] as const) {
      const row = run(kit, packing, shape);
      results.set(`${kit.id}/${shape}/${packing}`, row);
      console.log(
        `     ${shape.padEnd(13)} ${packing.padEnd(7)} ${row.fits ? `${f1(row.w)} × ${f1(row.d)}`.padEnd(16) : "does not fit    "} ` +
          `${f1(row.area).padStart(10)}  ${f3(row.util).padStart(11)}  ${row.ms.toFixed(0).padStart(12)}`,
      );
    }
  }
}
const ratio = (k: string, s: string) => results.get(`${k}/${s}/shapes`)!.area / results.get(`${k}/${s}/boxes`)!.area;
console.log("\nTargets (ratios from this run):");
console.log(`  (d) rounded-rect slab area, shapes ÷ boxes: ${f3(ratio("d", "rounded-rect"))} (target ≤ 0.75)`);
console.log(`  (e) rounded-rect slab area, shapes ÷ boxes: ${f3(ratio("e", "rounded-rect"))} (target ≤ 0.75)`);
const best = (k: string) =>
  Math.max(...(["rounded-rect", "contour", "disc"] as const).map((s) => results.get(`${k}/${s}/shapes`)!.util).filter(Number.isFinite));
console.log(`  (a) utilisation, best outline: ${f3(best("a"))} (target ≥ 0.85)`);
// The densest packing of equal circles in the plane is the hexagonal one, π/√12 ≈ 0.9069 (L. Fejes Tóth, 1940).
console.log(
  `  (b) utilisation, best outline: ${f3(best("b"))} (target ≥ 0.80; the plane's limit for equal circles is π/√12 = ` +
    `${(Math.PI / Math.sqrt(12)).toFixed(4)}, Fejes Tóth 1940)`,
);
const dd = results.get("d/disc/shapes")!;
console.log(`  (d) disc outline: ${dd.fits ? `${f1(dd.w)} mm across, fits the 220 mm bed` : "does not fit the 220 mm bed"}`);
const f = mixedKit();
const fParts = f.parts.map((p) => ({ ...p, mesh: orientMesh(p.mesh) }));
let t = performance.now();
const plan = planPlates(kernel, { parts: fParts, options: f.options, fonts });
const planMs = performance.now() - t;
if ("findings" in plan) console.log(`  (f) ${f.title}: refused: ${plan.findings.map((x) => x.message).join("; ")}`);
else {
  const sizes = plan.plates.map((p) => p.slots.length).join(" + ");
  console.log(
    `  (f) ${f.title}: ${plan.plates.length} plates (${sizes} pieces), area bound ${plan.areaBound} ` +
      `(target: the bound or one more), planned in ${planMs.toFixed(0)} ms`,
  );
}
// Nesting time for 50 pieces (kit f's mix, 50 pieces, on a bed that holds them): target ≤ 1.5 s on the server.
const fifty = f.parts.map((p, i) => ({ ...p, mesh: orientMesh(p.mesh), quantity: [10, 14, 14, 7, 5][i]! }));
const big: SlabOptionsInput = { ...f.options, layout: { bed: { width: 400, depth: 400 } } };
buildPlate(kernel, { parts: fifty, options: big, fonts });
t = performance.now();
const r50 = buildPlate(kernel, { parts: fifty, options: big, fonts });
console.log(
  `  nesting 50 pieces: ${(r50.stats.timings.layout ?? NaN).toFixed(0)} ms (target ≤ 1500), ` +
    `whole build ${(performance.now() - t).toFixed(0)} ms, ${r50.pieces.length} placed`,
);
