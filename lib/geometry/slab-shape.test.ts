import { beforeAll, describe, expect, it } from "vitest";
import { engine } from "@/tests/support/engine";
import { buildPlate, newPartCache, type PlatePart } from "./build-plate";
import { hexTile, pawn } from "./demo-shapes";
import type { FontBook } from "./fonts";
import type { Kernel } from "./kernel";
import { orientMesh } from "./orient";
import { DISC_SEGMENTS, enclosingCircle, roundedRect } from "./slab";

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});
const parts = (): PlatePart[] => [
  { id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 4 },
  { id: "pawn", name: "Beacon pawn", mesh: orientMesh(pawn()), quantity: 2 },
];
const marks = { text: [{ value: "ORDER 10482" }, { value: "Thank you, Sam!", size: 4 }], qr: { value: "https://shop.example/o/10482" } };

describe("smallest enclosing circle (Welzl)", () => {
  it("matches the handbook circles: a rectangle's half diagonal, an equilateral triangle's circumradius a/√3", () => {
    const rect = enclosingCircle([
      [0, 0],
      [40, 0],
      [40, 30],
      [0, 30],
      [20, 15],
      [5, 25],
    ]);
    expect(rect.r).toBeCloseTo(25, 9); // half of the 3-4-5 diagonal, 50 mm
    expect([rect.x, rect.y]).toEqual([expect.closeTo(20, 9), expect.closeTo(15, 9)]);
    const a = 10;
    const tri = enclosingCircle([
      [0, 0],
      [a, 0],
      [a / 2, (a * Math.sqrt(3)) / 2],
    ]);
    expect(tri.r).toBeCloseTo(a / Math.sqrt(3), 9);
    // An obtuse triangle: the circle on its longest side (the third point is inside it).
    const obtuse = enclosingCircle([
      [0, 0],
      [10, 0],
      [5, 1],
    ]);
    expect(obtuse.r).toBeCloseTo(5, 9);
  });

  it("holds every point of a scattered set, and no smaller circle about the same centre does", () => {
    let s = 7;
    const rnd = () => ((s = (s * 16807) % 2147483647) / 2147483647) * 100;
    const pts = Array.from({ length: 500 }, () => [rnd(), rnd() * 0.6] as [number, number]);
    const c = enclosingCircle(pts);
    const far = Math.max(...pts.map((p) => Math.hypot(p[0] - c.x, p[1] - c.y)));
    expect(far).toBeLessThanOrEqual(c.r + 1e-6);
    expect(far).toBeGreaterThan(c.r - 1e-6);
  });
});

describe("the slab's size is chosen with its marks and shape in view", () => {
  it("a disc holds every piece and mark, and is no larger than the circle around the content's bounding box", () => {
    const r = buildPlate(kernel, { parts: parts(), fonts, options: { slab: { shape: "disc", margin: 4 }, marks }, formats: [] });
    const { layout } = r;
    const boxes = [...r.pieces.map((p) => p.bounds), ...layout!.marks.map((m) => m.bounds)];
    const minX = Math.min(...boxes.map((b) => b.minX)),
      maxX = Math.max(...boxes.map((b) => b.maxX));
    const minY = Math.min(...boxes.map((b) => b.minY)),
      maxY = Math.max(...boxes.map((b) => b.maxY));
    const R = layout!.slab.width / 2;
    const cx = R,
      cy = R;
    // Margin kept (4 mm) from every mark's corner to the rim, and from every piece's ring (its shadow
    // outline grown by the default ring's clearance and width, 0.8 + 0.8 mm).
    for (const m of layout!.marks)
      for (const [x, y] of [
        [m.bounds.minX, m.bounds.minY],
        [m.bounds.maxX, m.bounds.minY],
        [m.bounds.minX, m.bounds.maxY],
        [m.bounds.maxX, m.bounds.maxY],
      ] as const) {
        expect(R - Math.hypot(x - cx, y - cy)).toBeGreaterThanOrEqual(4 - 1e-6);
      }
    for (const p of r.pieces)
      for (const c of p.outline) for (const [x, y] of c) expect(R - Math.hypot(x - cx, y - cy)).toBeGreaterThanOrEqual(4 + 1.6 - 1e-3);
    // The smallest enclosing circle is never larger than the one through the bounding box's corners
    // (the shadows here leave out the rings, 1.4 mm, and the number column, about 3.2 mm: 6 mm covers both).
    expect(R).toBeLessThanOrEqual((Math.hypot(maxX - minX, maxY - minY) / 2 + 6 + 4) / Math.cos(Math.PI / DISC_SEGMENTS));
    // Before pieces were packed with the marks' bands in view, this kit drew a 177 mm disc.
    expect(layout!.slab.width).toBeLessThan(172);
  });

  it("the same build with a part cache gives the same plate, and the second build measures no part again", () => {
    const cache = newPartCache();
    const ps = parts();
    const opts = { slab: { shape: "rounded-rect" as const }, marks };
    const plain = buildPlate(kernel, { parts: ps, fonts, options: opts, formats: ["stl"], variables: { date: "2026-12-02" } });
    const first = buildPlate(kernel, { parts: ps, fonts, options: opts, formats: ["stl"], cache, variables: { date: "2026-12-02" } });
    expect(cache.parts.get(ps[0]!.mesh)?.size).toBe(1);
    const before = kernel.live();
    const second = buildPlate(kernel, {
      parts: ps,
      fonts,
      options: { ...opts, layout: { spacing: 4 } },
      formats: ["stl"],
      cache,
      variables: { date: "2026-12-02" },
    });
    expect(Buffer.from(first.stl!).equals(Buffer.from(plain.stl!))).toBe(true);
    expect(second.stl!.length).toBeGreaterThan(84);
    expect(second.stats.timings.footprints).toBeLessThan(first.stats.timings.footprints!);
    expect(kernel.live()).toBe(before);
  });

  it("a cached build equals an uncached one, byte for byte, through a run of edits (the slab kept only when it is unchanged)", () => {
    const cache = newPartCache();
    const ps = parts();
    const v = { date: "2026-12-02", order: "10482" };
    const steps = [
      { slab: { gap: 0.25 }, marks },
      { slab: { gap: 0.3 }, marks }, // same slab, pieces higher: the slab is reused
      { slab: { gap: 0.3, cornerRadius: 8 }, marks }, // a new outline
      { slab: { gap: 0.3, cornerRadius: 8 }, marks: { ...marks, text: [{ value: "ORDER {order}", relief: "emboss" as const }] } },
      { slab: { gap: 0.2 }, marks }, // back to an earlier slab
    ];
    let reused = 0;
    for (const options of steps) {
      const a = buildPlate(kernel, { parts: ps, fonts, options, formats: ["stl"], variables: v, cache });
      const b = buildPlate(kernel, { parts: ps, fonts, options, formats: ["stl"], variables: v });
      expect(Buffer.from(a.stl!).equals(Buffer.from(b.stl!))).toBe(true);
      expect(a.estimates).toEqual(b.estimates);
      if (a.stats.timings["slab booleans"]! < b.stats.timings["slab booleans"]! / 4) reused++;
    }
    expect(cache.slabs.size).toBeGreaterThanOrEqual(3);
    expect(reused).toBeGreaterThanOrEqual(2);
  });

  it("a rounded rectangle whose radius is half its side has no repeated corner where its arcs meet", () => {
    // Found by the property test: two arc ends 1e-14 mm apart became one float32 corner in the STL,
    // and the proof (rightly) found triangles with a repeated corner.
    for (const [w, h] of [
      [40, 60],
      [60, 40],
      [40, 40],
    ]) {
      const c = roundedRect(3.2, 7.9, w!, h!, 100);
      for (let i = 0; i < c.length; i++) {
        const p = c[i]!,
          q = c[(i + 1) % c.length]!;
        expect(Math.hypot(p[0] - q[0], p[1] - q[1])).toBeGreaterThan(1e-6);
      }
    }
  });
});
