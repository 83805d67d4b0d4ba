/**
 * Plate truth: faults found when exported plates were checked with independent tools. Every check
 * here reads the exported STL bytes (Debian's admesh, and a kernel-free reading in tests/support),
 * never the engine's own solids.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { engine } from "@/tests/support/engine";
import { box } from "@/tests/support/meshes";
import { rasterizeStl, type HeightMap } from "@/tests/support/raster";
import { admesh, bodyStl, lowestTopSurface, slabAndPieces, type StlBody } from "@/tests/support/stl-bodies";
import { buildPlate, type PlatePart } from "./build-plate";
import { hexTile } from "./demo-shapes";
import type { FontBook } from "./fonts";
import type { Kernel } from "./kernel";
import type { SlabOptionsInput } from "./options";
import { orientMesh } from "./orient";

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

const tiles = (quantity = 2): PlatePart[] => [{ id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity }];
const counters = (quantity: number): PlatePart[] => [{ id: "cube", name: "Counter", mesh: orientMesh(box(6, 6, 6)), quantity }];
const build = (options: SlabOptionsInput, parts: PlatePart[]) => buildPlate(kernel, { parts, options, fonts, formats: ["stl"] });
const errors = (r: ReturnType<typeof build>) => r.findings.filter((f) => f.severity === "error");

/** The slab's presence seen from above, from its own triangles: z > 0 where the slab is. */
function slabMap(slab: StlBody): HeightMap {
  return rasterizeStl(bodyStl(slab), 10, { minX: slab.min[0] - 1, minY: slab.min[1] - 1, maxX: slab.max[0] + 1, maxY: slab.max[1] + 1 });
}
const on = (map: HeightMap, x: number, y: number) => {
  const px = Math.floor((x - map.originX) * map.pxPerMm),
    py = map.height - 1 - Math.floor((y - map.originY) * map.pxPerMm);
  return px >= 0 && py >= 0 && px < map.width && py < map.height && map.z[py * map.width + px]! > 0;
};
/** Share of a piece's bottom vertices (its footprint on the gap) that have slab under them. */
function support(piece: StlBody, map: HeightMap): number {
  let n = 0,
    held = 0;
  for (let i = 0; i < piece.tri.length; i += 3) {
    if (piece.tri[i + 2]! > piece.min[2] + 1e-4) continue;
    n++;
    if (on(map, piece.tri[i]!, piece.tri[i + 1]!)) held++;
  }
  return held / n;
}

describe("engraving never cuts the slab apart (fault 1)", () => {
  it("a 1.0 mm slab with text embossed 1.5 mm: the rings keep their own depth, one slab and its pieces", () => {
    const r = build({ slab: { thickness: 1 }, marks: { text: [{ value: "THANK YOU", relief: "emboss", depth: 1.5 }] } }, tiles());
    expect(errors(r)).toEqual([]);
    // admesh (Debian): parts = pieces + 1, nothing to repair.
    const a = admesh(r.stl!);
    expect(a.parts).toBe(r.pieces.length + 1);
    expect(a.disconnected + a.edgesFixed + a.facetsReversed + a.backwardsEdges).toBe(0);
    // The floor under the rings: 1.0 − 0.4 mm (their default depth), two 0.2 mm layers and more.
    expect(lowestTopSurface(slabAndPieces(r.stl!).slab)).toBeCloseTo(0.6, 4);
  });

  it("a 0.6 mm slab with 0.8 mm deep text is refused at the field, saying by how much", () => {
    const r = build({ slab: { thickness: 0.6 }, marks: { text: [{ value: "ORDER 7", depth: 0.8 }] } }, tiles());
    const f = errors(r).find((x) => x.code === "mark_too_deep");
    expect(f).toMatchObject({ field: ["marks", "text", 0, "depth"] });
    // 0.6 mm slab − 0.4 mm floor (2 × 0.2 mm layers, never under 0.4 mm) = 0.2 mm at most: 0.6 mm too deep.
    expect(f!.message).toContain("at most 0.20 mm deep (0.60 mm less)");
    expect(f!.message).toMatch(/text line 1 \("ORDER 7"\)/);
    expect(r.stl).toBeUndefined();
  });

  it('"as deep as allowed" engraves to the floor and no further, on every mark', () => {
    const r = build(
      {
        slab: { thickness: 0.8 },
        marks: {
          text: [{ value: "ORDER 7", depth: "max" }],
          qr: { value: "https://shop.example/o/7", depth: "max" },
          numberStyle: { depth: "max" },
          ringStyle: { depth: "max" },
        },
      },
      tiles(),
    );
    expect(errors(r)).toEqual([]);
    expect(admesh(r.stl!).parts).toBe(r.pieces.length + 1);
    const floor = lowestTopSurface(slabAndPieces(r.stl!).slab);
    expect(floor).toBeCloseTo(0.4, 4); // 0.8 − 0.4: exactly the floor
    expect(r.slicing!.minFloor).toBeCloseTo(0.4, 6);
  });

  it("pockets are held to the floor too (a 0.8 mm slab cannot take a 0.6 mm pocket)", () => {
    const r = build({ slab: { thickness: 0.8 }, marks: { outlines: "pocket", numbers: false, ringStyle: { depth: 0.6 } } }, tiles());
    expect(errors(r).map((f) => [f.code, f.field])).toEqual([["mark_too_deep", ["marks", "ringStyle", "depth"]]]);
  });
});

describe("the slab holds everything on it (faults 2 and 3)", () => {
  it.each([
    [20, 4],
    [26, 4],
    [30, 4],
    [40, 2],
  ])("30 small counters, corner radius %i mm, margin %i mm: every piece stands wholly on the slab, every mark on it", (radius, margin) => {
    const r = build({ slab: { cornerRadius: radius, margin }, marks: { text: [{ value: "ORDER 10482 THANK YOU" }] } }, counters(30));
    expect(errors(r)).toEqual([]);
    const { slab, pieces } = slabAndPieces(r.stl!);
    expect(pieces).toHaveLength(30);
    const map = slabMap(slab);
    for (const p of pieces) expect(support(p, map)).toBe(1);
    // The text line's box and every number's corner lie on the slab, with the margin to spare.
    for (const m of r.layout!.marks)
      for (const [x, y] of [
        [m.bounds.minX, m.bounds.minY],
        [m.bounds.maxX, m.bounds.minY],
        [m.bounds.minX, m.bounds.maxY],
        [m.bounds.maxX, m.bounds.maxY],
      ])
        expect([x, y, on(map, x!, y!)]).toEqual([x, y, true]);
    for (const p of r.pieces) expect([p.number, p.numberAt, on(map, p.numberAt!.x, p.numberAt!.y)]).toEqual([p.number, p.numberAt, true]);
    // The corners are still the radius asked for: the slab grew instead (or says why not).
    expect(r.findings.some((f) => f.code === "corners_grow_slab" || f.code === "corner_radius_limited")).toBe(radius - margin > 5);
  });

  it("with no margin, numbers stay on the slab: each one's glyphs start on it", () => {
    const r = build({ slab: { margin: 0 } }, counters(12));
    expect(errors(r)).toEqual([]);
    const map = slabMap(slabAndPieces(r.stl!).slab);
    for (const p of r.pieces) {
      expect(p.numberAt!.y).toBeGreaterThanOrEqual(0);
      expect(on(map, p.numberAt!.x + 0.05, p.numberAt!.y + 0.05)).toBe(true);
    }
  });
});

describe("mark sizes against the nozzle (fault 4)", () => {
  it("ring width, number size and number face are options, and the narrowest stroke is checked", () => {
    const narrow = build({ nozzle: 0.8, marks: { ringStyle: { width: 0.6 } } }, tiles(1));
    expect(errors(narrow)).toMatchObject([{ code: "ring_too_narrow", field: ["marks", "ringStyle", "width"] }]);
    expect(errors(narrow)[0]!.message).toContain("at least 0.80 mm wide (0.20 mm more)");
    // 2 mm numbers at a 0.8 mm nozzle: strokes under one line width (FDM design tables: ≥ 0.6 mm at 0.4).
    const small = build({ nozzle: 0.8, marks: { numberStyle: { size: 2 }, ringStyle: { width: 1 } } }, tiles(1));
    expect(small.findings.find((f) => f.code === "stroke_too_thin")).toMatchObject({ field: ["marks", "numberStyle", "size"] });
    const big = build({ nozzle: 0.8, marks: { numberStyle: { size: 8, font: "sans-bold" }, ringStyle: { width: 1 } } }, tiles(1));
    expect(big.findings.map((f) => f.code)).not.toContain("stroke_too_thin");
    expect(big.pieces[0]!.numberAt).toBeDefined();
  });
});

describe("the gap as a slicer makes it (fault 7)", () => {
  it("the defaults agree: a default plate carries no gap or layer finding, and the gap is one layer", () => {
    const r = build({}, tiles());
    expect(r.findings.filter((f) => /gap|layer|thickness/.test(f.code))).toEqual([]);
    expect(r.slicing).toMatchObject({ gap: 0.2, gapLayers: 1, slabTop: 1 });
  });

  it("reports the effective gap, and refuses one a slicer rounds to nothing", () => {
    const r = build({ slab: { gap: 0.3 }, layerHeight: 0.2 }, tiles());
    // Layers cut at their middle (from memory): a base at 1.3 mm starts in the layer 1.2–1.4 → 0.2 mm.
    expect(r.findings.find((f) => f.code === "gap_sliced")!.message).toContain("makes the 0.30 mm gap 0.20 mm (1 layer)");
    const fused = build({ slab: { gap: 0.1 }, firstLayerHeight: 0.25 }, tiles());
    expect(errors(fused).map((f) => f.code)).toContain("gap_sliced_away");
  });
});

describe("numbers in reading order, stable (fault 8)", () => {
  /** Three pieces in one row, of heights 6, 16 and 11 mm seen from above, left to right. */
  const row = (extra: SlabOptionsInput = {}) => {
    const parts: PlatePart[] = [
      { id: "a", name: "Short", mesh: orientMesh(box(10, 6, 3)), quantity: 1 },
      { id: "b", name: "Tall", mesh: orientMesh(box(10, 16, 3)), quantity: 1 },
      { id: "c", name: "Middle", mesh: orientMesh(box(10, 11, 3)), quantity: 1 },
    ];
    // Centred on one line, x = 20, 45, 70 (hand-placed, so toggles cannot move them).
    const placements = [1, 2, 3].map((piece, i) => ({ piece, x: 20 + 25 * i, y: 40, rotation: 0 }));
    return build({ ...extra, layout: { ...extra.layout, placements } }, parts);
  };
  const numbersBySlot = (r: ReturnType<typeof build>) => Object.fromEntries(r.pieces.map((p) => [p.slot, p.number]));

  it("a row of pieces of different heights reads 1, 2, 3 from left to right", () => {
    const r = row();
    expect(r.pieces.map((p) => p.partName)).toEqual(["Short", "Tall", "Middle"]);
  });

  it("toggling the QR code, the numbers or the outlines leaves every number as it was", () => {
    const base = numbersBySlot(row());
    expect(numbersBySlot(row({ marks: { qr: { value: "https://shop.example/o/7" } } }))).toEqual(base);
    expect(numbersBySlot(row({ marks: { outlines: "none" } }))).toEqual(base);
    expect(numbersBySlot(row({ marks: { outlines: "pocket" } }))).toEqual(base);
    expect(row({ marks: { numbers: false } }).pieces.map((p) => p.partName)).toEqual(["Short", "Tall", "Middle"]);
  });

  it("a reprint's numbers are the ones asked for, in kit order", () => {
    const r = build({ layout: { pieceNumbers: [12, 5] } }, tiles(2));
    expect(r.pieces.map((p) => [p.slot, p.number])).toEqual([
      [2, 5],
      [1, 12],
    ]);
  });
});

describe("the new rules' wording: what is wrong, where, by how much, what to change", () => {
  const fix = /\b(Make|make|Use|use|Choose|choose|Set|set|Give|give|thicken|Thicken|Move|move|Round|emboss)\b/;
  it.each([
    [
      "mark_too_deep",
      () => build({ slab: { thickness: 0.6 }, marks: { text: [{ value: "ORDER 7", depth: 0.8 }] } }, tiles()),
      /text line 1/,
      /0\.60 mm less/,
    ],
    [
      "slab_too_thin_to_engrave",
      () => build({ slab: { thickness: 0.6 }, layerHeight: 0.3, firstLayerHeight: 0.3 }, tiles()),
      /outline ring|piece numbers/,
      /0\.60 mm under it/,
    ],
    [
      "emboss_needs_height",
      () => build({ marks: { text: [{ value: "UP", relief: "emboss", depth: "max" }] } }, tiles()),
      /text line 1/,
      /height in mm/,
    ],
    ["ring_too_narrow", () => build({ nozzle: 0.8, marks: { ringStyle: { width: 0.6 } } }, tiles(1)), /Outline rings/, /0\.20 mm more/],
    ["corners_grow_slab", () => build({ slab: { cornerRadius: 20 } }, counters(30)), /corners/, /\d+\.\d mm wider/],
    [
      "corner_radius_limited",
      () => build({ slab: { cornerRadius: 40, margin: 2 }, layout: { bed: { width: 100, depth: 100 } } }, counters(30)),
      /100 × 100 mm bed/,
      /rounded to \d+\.\d mm/,
    ],
    ["gap_sliced_away", () => build({ slab: { gap: 0.1 }, firstLayerHeight: 0.25 }, tiles()), /0\.10 mm gap/, /to nothing/],
    ["gap_below_layer", () => build({ slab: { gap: 0.15 } }, tiles()), /0\.15 mm gap/, /thinner than one 0\.20 mm layer/],
    ["gap_sliced", () => build({ slab: { gap: 0.3 } }, tiles()), /0\.30 mm gap/, /0\.20 mm \(1 layer\)/],
    ["piece_numbers_mismatch", () => build({ layout: { pieceNumbers: [1] } }, tiles(2)), /layout\.pieceNumbers/, /1 numbers for 2 pieces/],
    ["plate_pieces_unknown", () => build({ layout: { pieces: [1, 5] } }, tiles(2)), /names piece 5/, /give pieces 1 to 2/],
    [
      "text_shrunk",
      () => build({ marks: { text: [{ value: "ORDER 7" }, { value: "Thank you, Jordan Okafor!", size: 4, maxWidth: 70 }] } }, tiles()),
      /Text line 2 \("Thank you, Jordan Okafor!"\)/,
      /reduced from 4 mm to \d+(\.\d)? mm/,
    ],
    [
      "text_too_long",
      () =>
        build(
          {
            marks: {
              text: [{ value: "ORDER 7" }, { value: "Thank you, Maximiliana Featherstonehaugh-Abernethy!", size: 4, maxWidth: 60 }],
            },
          },
          tiles(),
        ),
      /Text line 2 \("Thank you, Maximiliana Featherstonehaugh-Abernethy!"\)/,
      /\d+\.\d mm too long: even at \d+(\.\d)? mm/,
    ],
    [
      "text_too_long",
      () =>
        build(
          { marks: { text: [{ value: "ORDER 7" }, { value: "Thank you, Jordan Okafor!", size: 4, maxWidth: 70, fit: "refuse" }] } },
          tiles(),
        ),
      /Text line 2 \("Thank you, Jordan Okafor!"\)/,
      /\d+\.\d mm too long: at 4 mm/,
    ],
  ] as const)("%s", (code, make, where, howMuch) => {
    const f = make().findings.find((x) => x.code === code)!;
    expect(f, code).toBeDefined();
    expect(f.field).toBeDefined();
    expect(f.message).toMatch(where);
    expect(f.message).toMatch(howMuch);
    expect(f.message).toMatch(fix);
  });
});
