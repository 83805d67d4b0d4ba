import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { strFromU8, strToU8, unzipSync, zipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { engine, zlibDeflate } from "@/tests/support/engine";
import { buildPlate, type PlatePart, type PlateResult } from "@/lib/geometry/build-plate";
import { hexTile, pawn } from "@/lib/geometry/demo-shapes";
import type { FontBook } from "@/lib/geometry/fonts";
import type { Kernel } from "@/lib/geometry/kernel";
import { parseOptions, type SlabOptionsInput } from "@/lib/geometry/options";
import { orientMesh } from "@/lib/geometry/orient";
import { fillValue, provePlate, type Proof } from "./index";
import { readThreeMfBodies } from "./three-mf";

// Real plates built by the engine, then proven from their exported bytes alone; each tampering of
// those bytes must fail the rule it breaks.

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});
const dir = mkdtempSync(path.join(tmpdir(), "slab-proof-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const tile = (): PlatePart => ({ id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 4 });
const pawnPart = (): PlatePart => ({ id: "pawn", name: "Beacon pawn", mesh: orientMesh(pawn()), quantity: 2 });
const QR = "https://example.com/o/10482";
const withMarks: SlabOptionsInput = { marks: { text: [{ value: "ORDER {order}" }], qr: { value: "{order}-QR", module: 1 } } };

function plate(options: SlabOptionsInput = withMarks, parts = [tile(), pawnPart()]) {
  return buildPlate(kernel, { parts, options, fonts, formats: ["stl", "3mf"], variables: { order: "10482" }, deflateRaw: zlibDeflate });
}
function prove(r: PlateResult, options: SlabOptionsInput, bytes: { stl?: Uint8Array; threeMf?: Uint8Array } = {}, qrValue?: string): Proof {
  const o = parseOptions(options);
  return provePlate({
    stl: bytes.stl ?? r.stl!,
    threeMf: bytes.threeMf ?? r.threeMf!,
    options: o,
    pieces: r.pieces.length,
    qrValue: qrValue ?? (o.marks.qr ? fillValue(o.marks.qr.value, { order: "10482" }) : undefined),
    marks: r.layout!.marks,
    labels: r.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
  });
}
const rule = (p: Proof, id: string) => p.rules.find((r) => r.rule === id);

/** Facets [from, to) of body `i` in the STL (the writer puts the bodies one after another). */
function facetsOf(r: PlateResult, i: number): [number, number] {
  let from = 0;
  for (let k = 0; k < i; k++) from += r.bodies![k]!.mesh.triVerts.length / 3;
  return [from, from + r.bodies![i]!.mesh.triVerts.length / 3];
}
/** A copy of the STL with every corner of facets [from, to) changed by `f`. */
function moveCorners(stl: Uint8Array, [from, to]: [number, number], f: (x: number, y: number, z: number) => [number, number, number]) {
  const out = stl.slice();
  const v = new DataView(out.buffer);
  for (let t = from; t < to; t++) {
    for (let c = 0; c < 3; c++) {
      const o = 84 + 50 * t + 12 + 12 * c;
      const [x, y, z] = f(v.getFloat32(o, true), v.getFloat32(o + 4, true), v.getFloat32(o + 8, true));
      v.setFloat32(o, x, true);
      v.setFloat32(o + 4, y, true);
      v.setFloat32(o + 8, z, true);
    }
  }
  return out;
}

describe("a plate as built proves itself", () => {
  let r: PlateResult;
  beforeAll(() => {
    r = plate();
  });

  it("passes every rule with text, QR, numbers and rings, and says so in one line", () => {
    const p = prove(r, withMarks);
    expect(p.rules.filter((x) => !x.pass)).toEqual([]);
    expect(p.ok).toBe(true);
    // qrText is what jsQR decoded from the top-view raster of the slab.
    expect(p.figures).toMatchObject({ bodies: 7, openEdges: 0, worstSupport: 100, qrText: "10482-QR" });
    // 1.0 mm slab, 0.4 mm deep marks: 0.6 mm of floor left.
    expect(p.figures.minFloor).toBeCloseTo(0.6, 4);
    expect(p.summary).toBe("Checked: closed, 7 bodies, every piece on the slab, QR reads back, 3MF matches");
    expect(rule(p, "gap")!.figure).toBeCloseTo(0.2, 6); // the default gap: one 0.2 mm layer
  });

  it.each([
    ["embossed text and QR", { marks: { text: [{ value: "KIT 7", relief: "emboss" }], qr: { value: QR, relief: "emboss", module: 1 } } }],
    ["pockets under the pieces", { marks: { outlines: "pocket", qr: { value: QR } } }],
    ["a disc slab, no marks", { slab: { shape: "disc" }, marks: { numbers: false, outlines: "none" } }],
    ["a 0.3 mm gap on a 2 mm slab", { slab: { gap: 0.3, thickness: 2 } }],
  ] as [string, SlabOptionsInput][])("passes with %s", (_what, options) => {
    const b = plate(options);
    const p = prove(b, options);
    expect(p.rules.filter((x) => !x.pass)).toEqual([]);
  });

  it("reads the 3MF back to the engine's own bodies and sizes (3MF core: build item → components → mesh objects)", () => {
    const read = readThreeMfBodies(r.threeMf!);
    expect(read.unit).toBe("millimeter");
    expect(read.problems).toEqual([]);
    expect(read.bodies.map((b) => b.triangles)).toEqual(r.bodies!.map((b) => b.mesh.triVerts.length / 3));
  });
});

describe("tampered files fail the rule they break", () => {
  let r: PlateResult;
  beforeAll(() => {
    r = plate();
  });

  it("a triangle turned over: oriented", () => {
    const stl = r.stl!.slice();
    const o = 84 + 50 * 3 + 12; // facet 3's corners: swap the second and third
    const b = stl.slice(o + 12, o + 24);
    stl.copyWithin(o + 12, o + 24, o + 36);
    stl.set(b, o + 24);
    const p = prove(r, withMarks, { stl });
    expect(p.ok).toBe(false);
    expect(p.failed).toBe("oriented");
    expect(rule(p, "closed")!.pass).toBe(true); // still two triangles on every edge
    expect(rule(p, "oriented")!.figure).toBe(3); // its three edges now run the same way as their neighbours'
  });

  it("a triangle deleted: closed, with the open edges counted", () => {
    const n = new DataView(r.stl!.buffer, r.stl!.byteOffset).getUint32(80, true);
    const stl = new Uint8Array(84 + 50 * (n - 1));
    stl.set(r.stl!.subarray(0, 84 + 50 * 10));
    stl.set(r.stl!.subarray(84 + 50 * 11), 84 + 50 * 10);
    new DataView(stl.buffer).setUint32(80, n - 1, true);
    const p = prove(r, withMarks, { stl });
    expect(p.failed).toBe("closed");
    expect(p.figures.openEdges).toBe(3);
    expect(p.summary).toMatch(/^Not proven: The STL is not closed: 3 open edges/);
  });

  it("a piece moved off the slab: on_slab, naming the piece and how far off", () => {
    // Body 1 is piece 1: its centre moved onto the slab's right edge, so half of it hangs off.
    const width = r.layout!.slab.width;
    const b = r.pieces.find((q) => q.number === 1)!.bounds;
    const dx = width - (b.minX + b.maxX) / 2;
    const stl = moveCorners(r.stl!, facetsOf(r, 1), (x, y, z) => [x + dx, y, z]);
    const p = prove(r, withMarks, { stl });
    // Moved across a nested slab it may also land on a neighbour ("apart" comes first then); either
    // way the proof fails and the on_slab rule names it.
    expect(["on_slab", "apart"]).toContain(p.failed);
    expect(rule(p, "on_slab")!.pass).toBe(false);
    expect(p.figures.worstSupport).toBeLessThan(100);
    expect(rule(p, "on_slab")!.message).toMatch(/^The piece at x [\d.]+, y [\d.]+ mm stands [\d.]+ % off the slab/);
  });

  it("a piece lowered into the slab: gap, by how much", () => {
    const stl = moveCorners(r.stl!, facetsOf(r, 2), (x, y, z) => [x, y, z - 0.5]);
    const p = prove(r, withMarks, { stl });
    expect(p.failed).toBe("gap");
    expect(rule(p, "gap")!.message).toMatch(/sits 0\.30 mm into the slab/);
    expect(rule(p, "gap")!.figure).toBeCloseTo(-0.3, 4);
  });

  it("a piece raised off its gap: gap", () => {
    const stl = moveCorners(r.stl!, facetsOf(r, 1), (x, y, z) => [x, y, z + 0.3]);
    const p = prove(r, withMarks, { stl });
    expect(p.failed).toBe("gap");
    expect(rule(p, "gap")!.message).toMatch(/floats 0\.50 mm above the slab where 0\.20 mm was asked/);
  });

  it("QR modules flipped (the finder pattern at the top left filled in): qr", () => {
    const q = r.layout!.marks.find((k) => k.kind === "qr")!.bounds;
    const mod = 1,
      quiet = 4 * mod;
    // The top-left finder: 7 × 7 modules inside the quiet zone (ISO/IEC 18004 §6.3.3).
    const fx0 = q.minX + quiet - 0.01,
      fx1 = fx0 + 7 * mod + 0.02,
      fy1 = q.maxY - quiet + 0.01,
      fy0 = fy1 - 7 * mod - 0.02;
    const stl = moveCorners(r.stl!, facetsOf(r, 0), (x, y, z) =>
      x > fx0 && x < fx1 && y > fy0 && y < fy1 && Math.abs(z - 0.6) < 1e-4 ? [x, y, 0.99] : [x, y, z],
    );
    const p = prove(r, withMarks, { stl });
    expect(rule(p, "closed")!.pass).toBe(true);
    expect(p.failed).toBe("qr");
    expect(p.figures.qrText).toBeNull(); // jsQR finds no code without its finder pattern
  });

  it("a QR code that says something else than asked: qr, with both values", () => {
    const p = prove(r, withMarks, {}, "10483-QR");
    expect(p.failed).toBe("qr");
    expect(rule(p, "qr")!.message).toBe('The QR code reads "10482-QR", not "10483-QR" as asked.');
  });

  // 3MF Core Specification §3.4: the build item's components object lists every body.
  it("a 3MF with one body missing: three_mf", () => {
    const files = unzipSync(r.threeMf!);
    const model = strFromU8(files["3D/3dmodel.model"]!).replace('<component objectid="3"/>\n', "");
    const threeMf = zipSync({ ...files, "3D/3dmodel.model": strToU8(model) });
    const p = prove(r, withMarks, { threeMf });
    expect(p.failed).toBe("three_mf");
    expect(rule(p, "three_mf")!.message).toBe("The 3MF holds 6 bodies, the STL 7.");
  });

  it("a 3MF body moved: three_mf, naming the STL body it no longer matches", () => {
    const files = unzipSync(r.threeMf!);
    const model = strFromU8(files["3D/3dmodel.model"]!).replace(
      '<component objectid="3"/>',
      '<component objectid="3" transform="1 0 0 0 1 0 0 0 1 0.01 0 0"/>',
    );
    const p = prove(r, withMarks, { threeMf: zipSync({ ...files, "3D/3dmodel.model": strToU8(model) }) });
    expect(p.failed).toBe("three_mf");
    expect(rule(p, "three_mf")!.message).toMatch(/^No 3MF body matches the STL body at/);
  });
});

describe("faults the engine lets through today are caught", () => {
  it("a floor thinner than two layers fails: 0.6 mm left under marks, proven as if sliced at 0.35 mm layers", () => {
    // The engine refuses marks deeper than the floor allows, so the proof is given a plate with a
    // 0.6 mm floor and told of thicker layers than it was built for: 2 × 0.35 = 0.7 mm must stay.
    const options: SlabOptionsInput = { marks: { text: [{ value: "KIT 7" }] } };
    const p = prove(plate(options), { ...options, layerHeight: 0.35, firstLayerHeight: 0.35 });
    expect(p.failed === "floor" || rule(p, "floor")!.pass === false).toBe(true);
    expect(p.figures.minFloor).toBeCloseTo(0.6, 4);
    expect(rule(p, "floor")!.message).toMatch(/0\.60 mm .*: 0\.10 mm short of the 0\.70 mm/);
  });
});

/**
 * Debian's admesh, an independent STL checker: it exits 0 even on broken input and repairs by
 * default, so its report is parsed.
 */
function admesh(stl: Uint8Array) {
  const file = path.join(dir, `p${Math.random().toString(36).slice(2)}.stl`);
  writeFileSync(file, stl);
  const res = spawnSync("admesh", [file], { encoding: "utf8" });
  if (res.error) throw new Error(`admesh is not installed (scripts/setup.mjs installs Debian's admesh): ${res.error.message}`);
  const num = (label: string) => Number(new RegExp(`${label}\\s*:\\s*(-?[\\d.]+)`).exec(res.stdout)?.[1]);
  return {
    parts: num("Number of parts"),
    edgesFixed: num("Edges fixed"),
    facetsAdded: num("Facets added"),
    facetsReversed: num("Facets reversed"),
  };
}

describe("the proof's counts agree with admesh", () => {
  it("on an exported plate: admesh's parts = the proof's bodies, and nothing for either to fix", () => {
    const r = plate();
    const p = prove(r, withMarks);
    const a = admesh(r.stl!);
    // admesh (Debian): "Number of parts", "Edges fixed", "Facets reversed".
    expect(a.parts).toBe(p.figures.bodies);
    expect(a.edgesFixed).toBe(0);
    expect(a.facetsReversed).toBe(0);
    expect(p.figures.openEdges).toBe(0);
  });

  it("on a plate with a triangle deleted: admesh fills one facet where the proof counts its three open edges", () => {
    const r = plate();
    const n = new DataView(r.stl!.buffer, r.stl!.byteOffset).getUint32(80, true);
    const stl = new Uint8Array(84 + 50 * (n - 1));
    stl.set(r.stl!.subarray(0, 84 + 50 * 10));
    stl.set(r.stl!.subarray(84 + 50 * 11), 84 + 50 * 10);
    new DataView(stl.buffer).setUint32(80, n - 1, true);
    const a = admesh(stl);
    const p = prove(r, withMarks, { stl });
    expect(p.figures.openEdges).toBe(3);
    expect(a.facetsAdded).toBe(1); // admesh: "Facets added" (its hole filling)
    expect(a.parts).toBe(p.figures.bodies);
  });

  it("on a plate with a triangle turned over: admesh reverses one facet where the proof finds its three edges misoriented", () => {
    const r = plate();
    const stl = r.stl!.slice();
    const o = 84 + 50 * 3 + 12;
    const b = stl.slice(o + 12, o + 24);
    stl.copyWithin(o + 12, o + 24, o + 36);
    stl.set(b, o + 24);
    const a = admesh(stl);
    const p = prove(r, withMarks, { stl });
    expect(a.facetsReversed).toBe(1); // admesh: "Facets reversed"
    expect(rule(p, "oriented")!.figure).toBe(3);
  });
});
