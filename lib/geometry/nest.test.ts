/**
 * Nesting by shape, checked from outside the packer: the placed pieces' shadow outlines as the build
 * reports them, grown by each piece's ring and half the spacing with an independent polygon library
 * (clipper-lib, the JavaScript port of Angus Johnson's Clipper), must not overlap one another, must lie
 * inside the slab's outline, and the files must pass the plate's proof. The convex Minkowski sum is
 * checked against its definition (the hull of every pairwise sum of vertices).
 */
import ClipperLib from "clipper-lib";
import fc from "fast-check";
import { deflateRawSync } from "node:zlib";
import { beforeAll, describe, expect, it } from "vitest";
import { bar, discToken, gear, lBracket, cube } from "@/bench/nesting-kits";
import { fillValue, provePlate } from "@/lib/proof";
import { buildPlate, type PlatePart, type PlateResult } from "./build-plate";
import { hexTile } from "./demo-shapes";
import type { FontBook } from "./fonts";
import type { Kernel } from "./kernel";
import { convexArea, convexHullOf, minkowskiConvex, type Pt } from "./nest";
import { parseOptions, type SlabOptionsInput } from "./options";
import { orientMesh } from "./orient";
import { engine } from "@/tests/support/engine";

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

const SCALE = 1e4; // clipper-lib works in integers: 0.1 µm
type Path = { X: number; Y: number }[];
const toPath = (c: [number, number][]): Path => c.map(([x, y]) => ({ X: Math.round(x * SCALE), Y: Math.round(y * SCALE) }));
const areaOf = (paths: Path[]) => paths.reduce((s, p) => s + ClipperLib.Clipper.Area(p), 0) / SCALE ** 2;

/** Outlines grown by `by` mm (round joins), as clipper-lib does it. */
function grown(contours: [number, number][][], by: number): Path[] {
  const co = new ClipperLib.ClipperOffset(2, 0.25 * SCALE * 0.01);
  co.AddPaths(contours.map(toPath), ClipperLib.JoinType.jtRound, ClipperLib.EndType.etClosedPolygon);
  const out: Path[] = [];
  co.Execute(out, by * SCALE);
  return out;
}
function clip(a: Path[], b: Path[], type: number): Path[] {
  const c = new ClipperLib.Clipper();
  c.AddPaths(a, ClipperLib.PolyType.ptSubject, true);
  c.AddPaths(b, ClipperLib.PolyType.ptClip, true);
  const out: Path[] = [];
  c.Execute(type, out, ClipperLib.PolyFillType.pftNonZero, ClipperLib.PolyFillType.pftNonZero);
  return out;
}

const part = (id: string, mesh: PlatePart["mesh"], quantity: number): PlatePart => ({ id, name: id, mesh: orientMesh(mesh), quantity });

function build(parts: PlatePart[], asked: SlabOptionsInput): PlateResult {
  const options = { ...asked, layout: { packing: "shapes" as const, ...asked.layout } };
  return buildPlate(kernel, { parts, options, fonts, formats: ["stl", "3mf"], deflateRaw: (d) => deflateRawSync(d, { level: 1 }) });
}

/** No two pieces' rings come closer than the spacing, and every ring lies on the slab with its margin. */
function expectNested(r: PlateResult, options: SlabOptionsInput) {
  const o = parseOptions(options);
  const ring =
    o.marks.outlines === "ring"
      ? o.marks.ringStyle.clearance + o.marks.ringStyle.width
      : o.marks.outlines === "pocket"
        ? o.marks.ringStyle.clearance
        : 0;
  const spacing = Math.max(o.layout.spacing, o.nozzle);
  expect(r.layout).not.toBeNull();
  // 0.02 mm under the spacing: the kernel's round offsets and the outline's simplification (0.01 mm).
  const shapes = r.pieces.map((p) => grown(p.outline, ring + spacing / 2 - 0.02));
  for (let i = 0; i < shapes.length; i++) {
    for (let j = i + 1; j < shapes.length; j++) {
      const overlap = areaOf(clip(shapes[i]!, shapes[j]!, ClipperLib.ClipType.ctIntersection));
      expect(overlap, `pieces ${r.pieces[i]!.number} and ${r.pieces[j]!.number} overlap`).toBeLessThan(1e-3);
    }
  }
  const slab = r.layout!.slab.outline.map(toPath);
  for (const p of r.pieces) {
    const outside = areaOf(clip(grown(p.outline, ring), slab, ClipperLib.ClipType.ctDifference));
    expect(outside, `piece ${p.number} reaches off the slab`).toBeLessThan(1e-3);
  }
  const proof = provePlate({
    stl: r.stl!,
    threeMf: r.threeMf!,
    options: o,
    pieces: r.pieces.length,
    qrValue: o.marks.qr ? fillValue(o.marks.qr.value, {}) : undefined,
    marks: r.layout!.marks,
    labels: r.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
  });
  expect(proof.ok, proof.summary).toBe(true);
}

/** The test's own hull (Andrew's monotone chain, only exactly collinear points dropped): the reference. */
function strictHull(points: Pt[]): Pt[] {
  const p = [...points].sort((u, v) => u[0] - v[0] || u[1] - v[1]);
  const cross = (o: Pt, u: Pt, v: Pt) => (u[0] - o[0]) * (v[1] - o[1]) - (u[1] - o[1]) * (v[0] - o[0]);
  const half = (q: Pt[]) => {
    const h: Pt[] = [];
    for (const x of q) {
      while (h.length >= 2 && cross(h[h.length - 2]!, h[h.length - 1]!, x) <= 0) h.pop();
      h.push(x);
    }
    return h.slice(0, -1);
  };
  return [...half(p), ...half([...p].reverse())];
}

describe("the convex Minkowski sum", () => {
  const convex = fc
    .array(fc.tuple(fc.double({ min: -50, max: 50, noNaN: true }), fc.double({ min: -50, max: 50, noNaN: true })), {
      minLength: 3,
      maxLength: 20,
    })
    .map((pts) => convexHullOf(pts as Pt[]))
    .filter((h) => h.length >= 3 && convexArea(h) > 1);
  it("equals the hull of every pairwise sum of vertices (its definition)", () => {
    fc.assert(
      fc.property(convex, convex, (a, b) => {
        const fast = minkowskiConvex(a, b);
        const ref = strictHull(a.flatMap((p) => b.map((q): Pt => [p[0] + q[0], p[1] + q[1]])));
        expect(Math.abs(convexArea(fast) - convexArea(ref))).toBeLessThan(1e-6 * Math.max(1, convexArea(ref)));
        // Every corner of the fast sum is a pairwise sum's hull point: on or inside the reference.
        for (const p of fast) {
          for (let i = 0; i < ref.length; i++) {
            const a = ref[i]!,
              b = ref[(i + 1) % ref.length]!;
            // Its distance outside the edge's line: at most 0.1 µm (nesting works to 1 µm).
            const len = Math.hypot(b[0] - a[0], b[1] - a[1]);
            if (len < 1e-6) continue; // an edge too short to give a direction
            expect(((b[0] - a[0]) * (p[1] - a[1]) - (b[1] - a[1]) * (p[0] - a[0])) / len).toBeGreaterThan(-1e-4);
          }
        }
      }),
      { seed: 19, numRuns: 200 },
    );
  });
});

describe("nesting by shape", () => {
  it("hexagon tiles interlock: no overlaps, all on the slab, proven; and less slab than packing their boxes", () => {
    const parts = [part("hex", hexTile(30, 4), 24)];
    const options: SlabOptionsInput = { layout: { spacing: 1 }, marks: { numbers: false, outlines: "none" } };
    const r = build(parts, options);
    expectNested(r, options);
    const boxes = build(parts, { ...options, layout: { ...options.layout, packing: "boxes" } });
    expect(r.layout!.slab.width * r.layout!.slab.depth).toBeLessThan(boxes.layout!.slab.width * boxes.layout!.slab.depth);
  });

  it("gears, cubes and bars with rings and numbers, text and a QR code: no overlaps, all on the slab, proven", () => {
    const options: SlabOptionsInput = {
      marks: { text: [{ value: "ORDER 7731" }], qr: { value: "https://example.com/o/7731" }, numbers: true, outlines: "ring" },
    };
    expectNested(build([part("gear", gear(40, 16), 3), part("cube", cube(10), 3), part("bar", bar(60, 6), 2)], options), options);
  });

  it("L-brackets nest as their true, non-convex shape, turned in 15° steps", () => {
    const options: SlabOptionsInput = { marks: { numbers: true, outlines: "pocket" } };
    const r = build([part("l", lBracket(40, 8), 4)], options);
    expectNested(r, options);
    for (const p of r.pieces) expect((((p.rotation % 15) + 15) % 15) % 15).toBeCloseTo(0, 6);
  });

  it("a disc packs its pieces round its centre: smaller than a disc round the boxes' packing", () => {
    const parts = [part("disc", discToken(25), 12)];
    const options: SlabOptionsInput = { slab: { shape: "disc" }, marks: { numbers: true, outlines: "ring" } };
    const r = build(parts, options);
    expectNested(r, options);
    const boxes = build(parts, { ...options, layout: { packing: "boxes" } });
    expect(r.layout!.slab.width).toBeLessThan(boxes.layout!.slab.width);
  });

  it("is deterministic: the same input gives the same bytes", () => {
    const parts = [part("gear", gear(40, 16), 2), part("cube", cube(10), 3)];
    const a = build(parts, {}),
      b = build(parts, {});
    expect(Buffer.from(a.stl!).equals(Buffer.from(b.stl!))).toBe(true);
    expect(a.pieces.map((p) => [p.x, p.y, p.rotation])).toEqual(b.pieces.map((p) => [p.x, p.y, p.rotation]));
  });

  it("a piece placed by hand stays where it was put; the rest nest round it", () => {
    const parts = [part("hex", hexTile(30, 4), 5)];
    const first = build(parts, {});
    const moved = { piece: 3, x: 120, y: 120, rotation: 10 };
    const options: SlabOptionsInput = { layout: { placements: [moved] } };
    const r = build(parts, options);
    const p3 = r.pieces.find((p) => p.slot === 3)!;
    // The slab is moved to start at (0, 0): the piece keeps its place against the others, and its turn.
    expect(p3.rotation).toBe(10);
    expectNested(r, options);
    expect(first.pieces.length).toBe(5);
  });
});
