import { createHash } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { engine, zlibDeflate } from "@/tests/support/engine";
import { readWeldedStl } from "@/lib/proof/stl";
import { buildPlate, newPartCache, type PlatePart } from "./build-plate";
import { hexTile, pawn } from "./demo-shapes";
import type { FontBook } from "./fonts";
import type { Kernel } from "./kernel";
import type { SlabOptionsInput } from "./options";
import { orientMesh } from "./orient";
import { decodePrepared, encodePrepared, PREPARED_VERSION, PreparedPartError, type PreparedPart } from "./prepared";
import { preparedSource } from "@/lib/parts/prepared-source";

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

const parts = (): PlatePart[] => [
  { id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 3 },
  { id: "pawn", name: "Beacon pawn", mesh: orientMesh(pawn(64)), quantity: 2 },
];
const options: SlabOptionsInput = {
  marks: { text: [{ value: "ORDER 20417" }], qr: { value: "https://example.com/o/20417" }, numbers: true, outlines: "ring" },
};

/** Each part's preparation as a cold build leaves it in the cache, written to bytes and read back. */
function prepareThroughBytes(ps: PlatePart[], layerHeight = 0.2) {
  const cache = newPartCache();
  const cold = buildPlate(kernel, {
    parts: ps,
    options: { ...options, layerHeight },
    fonts,
    formats: ["stl", "3mf"],
    cache,
    deflateRaw: zlibDeflate,
  });
  const bytes = ps.map((p) =>
    encodePrepared({
      mesh: p.mesh,
      shells: 1,
      read: { unit: "millimeter", warnings: [], size: [1, 2, 3] },
      measures: cache.parts.get(p.mesh)!,
    }),
  );
  return { cold, bytes };
}

describe("a prepared part", () => {
  it("reads back bit for bit: the mesh's float32 positions and triangles, and every measure (ECMA-262 shortest round-trip numbers)", () => {
    const ps = parts();
    const { bytes } = prepareThroughBytes(ps);
    const back = decodePrepared(bytes[1]!);
    expect(Buffer.from(back.mesh.vertProperties.buffer).equals(Buffer.from(ps[1]!.mesh.vertProperties.buffer))).toBe(true);
    expect(Array.from(back.mesh.triVerts)).toEqual(Array.from(ps[1]!.mesh.triVerts));
    expect(back.read).toEqual({ unit: "millimeter", warnings: [], size: [1, 2, 3] });
    expect([...back.measures.keys()]).toEqual([0.2]);
    const m = back.measures.get(0.2)!;
    expect(m.shadow.length).toBeGreaterThan(0);
    expect(m.volume).toBeGreaterThan(0);
    // The same bytes again from what was read: nothing is lost or rounded on the way.
    expect(Buffer.from(encodePrepared(back)).equals(Buffer.from(bytes[1]!))).toBe(true);
  });

  it("gives a build whose exported STL and 3MF are byte for byte those of the build that measured the parts", () => {
    const { cold, bytes } = prepareThroughBytes(parts());
    // A fresh process: meshes and measures only from the bytes, no part measured again.
    const prepared = bytes.map(decodePrepared);
    const cache = newPartCache();
    for (const p of prepared) cache.parts.set(p.mesh, new Map(p.measures));
    const warmParts = parts().map((p, i) => ({ ...p, mesh: prepared[i]!.mesh }));
    const warm = buildPlate(kernel, {
      parts: warmParts,
      options: { ...options, layerHeight: 0.2 },
      fonts,
      formats: ["stl", "3mf"],
      cache,
      deflateRaw: zlibDeflate,
    });
    expect(Buffer.from(warm.stl!).equals(Buffer.from(cold.stl!))).toBe(true);
    expect(Buffer.from(warm.threeMf!).equals(Buffer.from(cold.threeMf!))).toBe(true);
    // And the file is the plate asked for (read by the proof's own STL reader): 5 pieces + the slab, welded closed.
    expect(readWeldedStl(warm.stl!).triangles).toBe(readWeldedStl(cold.stl!).triangles);
    expect(warm.pieces.map((p) => p.number)).toEqual(cold.pieces.map((p) => p.number));
    // Its measures were taken from the cache: the footprint stage did no kernel work worth a lap of its own.
    expect(cache.parts.get(prepared[0]!.mesh)!.get(0.2)).toBe(prepared[0]!.measures.get(0.2));
  });

  it("a layer height it was not measured at is measured then, and both are kept", () => {
    const ps = parts();
    const { bytes } = prepareThroughBytes(ps);
    const p = decodePrepared(bytes[0]!);
    const cache = newPartCache();
    cache.parts.set(p.mesh, new Map(p.measures));
    buildPlate(kernel, { parts: [{ ...ps[0]!, mesh: p.mesh }], options: { ...options, layerHeight: 0.12 }, fonts, formats: [], cache });
    expect([...cache.parts.get(p.mesh)!.keys()].sort()).toEqual([0.12, 0.2]);
    const again = decodePrepared(encodePrepared({ ...p, measures: cache.parts.get(p.mesh)! }));
    expect([...again.measures.keys()]).toEqual([0.12, 0.2]);
    // The contact is sliced one layer up, so it differs with the layer height on a chamfered tile; the shadow does not.
    expect(again.measures.get(0.12)!.shadowArea).toBe(again.measures.get(0.2)!.shadowArea);
  });

  it("refuses bytes that are not a prepared part, or cut short", () => {
    const { bytes } = prepareThroughBytes(parts().slice(0, 1));
    expect(() => decodePrepared(new TextEncoder().encode("solid nothing"))).toThrow(PreparedPartError);
    expect(() => decodePrepared(bytes[0]!.subarray(0, bytes[0]!.byteLength - 4))).toThrow(/header asks for/);
  });

  it("is found by a key that changes with every choice that shapes the mesh", () => {
    const base = { blobKey: "a".repeat(64), unit: "millimeter", layFlat: false, turned: false, rotation: 0 };
    const keys = new Set(
      [
        base,
        { ...base, blobKey: "b".repeat(64) },
        { ...base, unit: "inch" },
        { ...base, layFlat: true },
        { ...base, turned: true },
        { ...base, rotation: 90 },
      ].map(preparedSource),
    );
    expect(keys.size).toBe(6);
    expect(preparedSource(base)).toMatch(/^[0-9a-f]{64}$/);
    expect(preparedSource({ blobKey: base.blobKey })).toBe(preparedSource({ ...base, unit: undefined }));
  });

  it(`pins what the engine measures to PREPARED_VERSION (${PREPARED_VERSION}): a change to reading or measuring must raise it`, () => {
    // When this fails because the measuring changed on purpose, raise PREPARED_VERSION in prepared.ts
    // (kept blobs of the older engine are then not used) and write the new digest here.
    const cache = newPartCache();
    const tile: PlatePart = { id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 1 };
    buildPlate(kernel, { parts: [tile], options: { marks: { numbers: false, outlines: "none" } }, fonts, formats: [], cache });
    const prepared: PreparedPart = {
      mesh: tile.mesh,
      shells: 1,
      read: { unit: "millimeter", warnings: [], size: [0, 0, 0] },
      measures: cache.parts.get(tile.mesh)!,
    };
    const digest = createHash("sha256").update(encodePrepared(prepared)).digest("hex");
    expect({ version: PREPARED_VERSION, digest }).toEqual({
      version: 1,
      digest: "dec54f20cb8b9cb98e26faa53c279e4a325eecc68c113b7c3bdea69613a1afb3",
    });
  });
});
