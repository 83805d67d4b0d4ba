import { describe, expect, it } from "vitest";
import { PAPERS, placeLabels, tilePlan, TILE_OVERLAP } from "./sheet-layout";

describe("paper sizes", () => {
  it("are the standards' sizes in mm", () => {
    // ISO 216: A4 210 × 297 mm, A3 297 × 420 mm; ANSI/ASME Y14.1: Letter 8.5 × 11 in, Tabloid (B) 11 × 17 in.
    expect([PAPERS.a4.w, PAPERS.a4.h]).toEqual([210, 297]);
    expect([PAPERS.a3.w, PAPERS.a3.h]).toEqual([297, 420]);
    for (const [paper, inches] of [
      [PAPERS.letter, [8.5, 11]],
      [PAPERS.tabloid, [11, 17]],
    ] as const) {
      expect(paper.w).toBeCloseTo(inches[0] * 25.4, 9);
      expect(paper.h).toBeCloseTo(inches[1] * 25.4, 9);
    }
  });
});

describe("tilePlan", () => {
  it("is one window for a slab that fits", () => {
    const p = tilePlan({ width: 144, depth: 195 }, { w: 186, h: 249 });
    expect(p).toEqual({ columns: 1, rows: 1, tiles: [{ column: 0, row: 0, x0: 0, y0: 0, w: 144, h: 195 }] });
  });

  it("covers a larger slab with windows no larger than the area, neighbours overlapping", () => {
    const slab = { width: 400, depth: 300 },
      area = { w: 186, h: 249 };
    const p = tilePlan(slab, area);
    expect([p.columns, p.rows]).toEqual([3, 2]);
    for (const t of p.tiles) {
      expect(t.w).toBeLessThanOrEqual(area.w);
      expect(t.h).toBeLessThanOrEqual(area.h);
      expect(t.x0).toBeGreaterThanOrEqual(0);
      expect(t.x0 + t.w).toBeLessThanOrEqual(slab.width + 1e-9);
      expect(t.y0 + t.h).toBeLessThanOrEqual(slab.depth + 1e-9);
    }
    // Neighbours in a row share the overlap; the last reaches the slab's edge.
    const row0 = p.tiles.filter((t) => t.row === 0);
    for (let i = 1; i < row0.length; i++) expect(row0[i - 1]!.x0 + row0[i - 1]!.w - row0[i]!.x0).toBeCloseTo(TILE_OVERLAP, 9);
    expect(row0.at(-1)!.x0 + row0.at(-1)!.w).toBeCloseTo(slab.width, 9);
    // The first row is the slab's far edge (top of the drawing), the last reaches y = 0.
    expect(p.tiles[0]!.y0 + p.tiles[0]!.h).toBeCloseTo(slab.depth, 9);
    expect(Math.min(...p.tiles.map((t) => t.y0))).toBeCloseTo(0, 9);
    // Every point of the slab is in some window (sampled on a 5 mm grid).
    for (let x = 0; x <= slab.width; x += 5)
      for (let y = 0; y <= slab.depth; y += 5)
        expect(p.tiles.some((t) => x >= t.x0 - 1e-9 && x <= t.x0 + t.w + 1e-9 && y >= t.y0 - 1e-9 && y <= t.y0 + t.h + 1e-9)).toBe(true);
  });
});

describe("placeLabels", () => {
  const width = (text: string, size: number) => text.length * size * 0.7;
  it("keeps a number inside a piece that has room for it", () => {
    const [l] = placeLabels([{ number: 1, bounds: { minX: 0, minY: 0, maxX: 20, maxY: 20 } }], width);
    expect(l!.inside).toBe(true);
    expect([l!.x, l!.y]).toEqual([10, 10]);
    expect(l!.leader).toBeUndefined();
  });

  it("puts a tiny piece's number beside it, clear of every piece, with a leader from the piece", () => {
    const pieces = [
      { number: 12, bounds: { minX: 10, minY: 10, maxX: 12, maxY: 12 } }, // a 2 mm pin
      { number: 13, bounds: { minX: 14, minY: 8, maxX: 30, maxY: 14 } }, // a neighbour on its right
    ];
    const [pin] = placeLabels(pieces, width);
    expect(pin!.inside).toBe(false);
    for (const p of pieces) {
      const b = p.bounds;
      const clear = pin!.box.maxX <= b.minX || pin!.box.minX >= b.maxX || pin!.box.maxY <= b.minY || pin!.box.minY >= b.maxY;
      expect(clear).toBe(true);
    }
    const [x1, y1, x2, y2] = pin!.leader!;
    expect([x1, y1]).toEqual([11, 11]); // from the pin's centre
    expect(x2 >= pin!.box.minX && x2 <= pin!.box.maxX && y2 >= pin!.box.minY && y2 <= pin!.box.maxY).toBe(true);
  });
});
