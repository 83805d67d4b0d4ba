import { beforeAll, describe, expect, it } from "vitest";
import { boxShell as box } from "@/tests/support/meshes";
import { engine, zlibDeflate } from "@/tests/support/engine";
import { buildPlate, type PlateResult } from "@/lib/geometry/build-plate";
import type { FontBook } from "@/lib/geometry/fonts";
import type { Kernel } from "@/lib/geometry/kernel";
import { combineMeshes, type IndexedMesh } from "@/lib/geometry/mesh";
import { parseOptions, type SlabOptionsInput } from "@/lib/geometry/options";
import { orientMesh } from "@/lib/geometry/orient";
import { provePlate, type Proof } from "./index";
import { readThreeMfBodies } from "./three-mf";

// Parts that are several closed shells: a hollow part (its inner wall an inside-out shell) and a
// part of two loose bodies. Real plates built by the engine, proven from their bytes; the caller says
// how many shells each piece is.

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

const hollow = () => combineMeshes([box([0, 0, 0], [20, 20, 20]), box([5, 5, 5], [15, 15, 15], true)]);
const twoBodies = () => combineMeshes([box([0, 0, 0], [12, 12, 8]), box([15, 0, 0], [23, 8, 8])]);
/** Two bodies, the second 4 mm above the first: a piece with a part split off in mid-air. */
const splitInAir = () => combineMeshes([box([0, 0, 0], [12, 12, 8]), box([2, 2, 12], [10, 10, 16])]);

const options: SlabOptionsInput = { marks: { text: [{ value: "KIT 7" }] } };
function plate(mesh: IndexedMesh, quantity = 2): PlateResult {
  return buildPlate(kernel, {
    parts: [{ id: "p", name: "Shell part", mesh: orientMesh(mesh), quantity }],
    options,
    fonts,
    formats: ["stl", "3mf"],
    deflateRaw: zlibDeflate,
  });
}
function prove(r: PlateResult, shells?: number[], stl?: Uint8Array): Proof {
  return provePlate({
    stl: stl ?? r.stl!,
    threeMf: r.threeMf!,
    options: parseOptions(options),
    pieces: r.pieces.length,
    marks: r.layout!.marks,
    labels: r.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
    shells,
  });
}
const rule = (p: Proof, id: string) => p.rules.find((x) => x.rule === id)!;
/** A copy of the STL with facets [from, to) moved by dz (binary STL: 50 bytes a facet after 84). */
function raise(stl: Uint8Array, from: number, to: number, dz: number): Uint8Array {
  const out = stl.slice();
  const v = new DataView(out.buffer);
  for (let t = from; t < to; t++)
    for (let c = 0; c < 3; c++) v.setFloat32(84 + 50 * t + 12 + 12 * c + 8, v.getFloat32(84 + 50 * t + 12 + 12 * c + 8, true) + dz, true);
  return out;
}
/** The first facet of piece `i`'s mesh in the STL (the writer puts the slab, then each piece in turn). */
function firstFacet(r: PlateResult, i: number): number {
  let from = 0;
  for (let k = 0; k <= i; k++) from += r.bodies![k]!.mesh.triVerts.length / 3;
  return from;
}

describe("a hollow part: an outer shell and an inside-out inner one", () => {
  let r: PlateResult;
  beforeAll(() => {
    r = plate(hollow());
  });

  it("passes every rule when each piece is said to be two shells, the cavity counted as a hollow", () => {
    const p = prove(r, [2, 2]);
    expect(p.rules.filter((x) => !x.pass)).toEqual([]);
    expect(p.figures.bodies).toBe(5);
    expect(rule(p, "volume").message).toBe("Every body has a positive volume, but for 2 inside-out shells each inside one (a hollow).");
    expect(rule(p, "bodies").message).toBe("5 bodies: the slab and 2 pieces of 4 shells.");
  });

  it("reads the 3MF's shells back at the boxes' volumes, the cavity negative (V = a³: 20³ and −10³ mm³)", () => {
    // The boxes' shells: 12 triangles each (two a face); the slab has many more.
    const volumes = readThreeMfBodies(r.threeMf!)
      .shells.filter((s) => s.triangles === 12)
      .map((s) => s.volume)
      .sort((a, b) => a - b);
    expect(volumes).toHaveLength(4);
    // To 0.02 mm³: the file's float32 corners sit within about 4e-6 mm of their places at 100 mm from
    // the origin (IEEE 754 single precision), and that over a box's 600–2400 mm² of faces is ~0.01 mm³.
    [-1000, -1000, 8000, 8000].forEach((want, i) => expect(Math.abs(volumes[i]! - want)).toBeLessThan(0.02));
  });

  it("fails bodies when the pieces are said to be one shell each (the count stays strict)", () => {
    const p = prove(r);
    expect(p.failed).toBe("bodies");
    expect(rule(p, "bodies").message).toBe("5 bodies where 2 pieces and the slab make 3.");
  });

  it("still fails volume for an inside-out shell that lies inside nothing", () => {
    // The first piece's outer shell turned inside out (each facet's last two corners swapped): now
    // neither of its shells has a positive body around it.
    const out = r.stl!.slice();
    const from = firstFacet(r, 0);
    for (let t = from; t < from + 12; t++) {
      const o = 84 + 50 * t + 12;
      const b = out.slice(o + 12, o + 24);
      out.copyWithin(o + 12, o + 24, o + 36);
      out.set(b, o + 24);
    }
    const p = prove(r, [2, 2], out);
    expect(rule(p, "volume").pass).toBe(false);
    expect(rule(p, "volume").message).toMatch(/^2 bodies have no positive volume/);
  });
});

describe("a part of two loose bodies", () => {
  let r: PlateResult;
  beforeAll(() => {
    r = plate(twoBodies());
  });

  it("passes when each piece is said to be two shells: one part's bodies are not two pieces", () => {
    const p = prove(r, [2, 2]);
    expect(p.rules.filter((x) => !x.pass)).toEqual([]);
    expect(rule(p, "on_slab").message).toBe("Every piece's lowest layer lies on the slab (2 pieces, 4 bodies).");
  });

  it("fails bodies by piece when the shells are said to lie elsewhere (1 and 3 for 2 and 2)", () => {
    const p = prove(r, [1, 3]);
    expect(p.failed).toBe("bodies");
    // Piece 1's two bodies fit neither piece of its own one shell nor (by bounds) the other piece.
    expect(rule(p, "bodies").message).toBe(`Piece ${r.pieces[0]!.number} has 0 shells where its part has 1 (2 pieces differ).`);
  });

  it("fails gap when one of a piece's bodies is lifted off the gap: each body stands on the slab on its own", () => {
    // The first piece's first box (12 facets) raised 0.3 mm: 0.5 mm above the slab for 0.2 asked.
    const from = firstFacet(r, 0);
    const p = prove(r, [2, 2], raise(r.stl!, from, from + 12, 0.3));
    expect(p.failed).toBe("gap");
    expect(rule(p, "gap").message).toMatch(/floats 0\.50 mm above the slab where 0\.20 mm was asked/);
  });
});

describe("a piece split off in mid-air", () => {
  it("fails whether it is said to be one shell (bodies) or two (gap)", () => {
    const r = plate(splitInAir());
    expect(prove(r).failed).toBe("bodies");
    const p = prove(r, [2, 2]);
    expect(p.failed).toBe("gap");
    expect(rule(p, "gap").message).toMatch(/^Piece \d \(at x [\d.]+, y [\d.]+ mm\) has no slab under it\.$/);
  });
});
