import { strFromU8, strToU8, unzipSync, zipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { engine, zlibDeflate } from "@/tests/support/engine";
import { buildPlate, type PlateResult } from "@/lib/geometry/build-plate";
import { hexTile } from "@/lib/geometry/demo-shapes";
import { parseOptions, type SlabOptionsInput } from "@/lib/geometry/options";
import { orientMesh } from "@/lib/geometry/orient";
import { fillValue, provePlate, provePlateAsync, type Proof, type ProofInput } from "@/lib/proof";
import { countEdgesOffThread, readThreeMfOffThread, stopProofThread } from "./proof-thread";

// The worker's proof on two threads (the 3MF read and the STL's edges counted on the second) says
// exactly what the one-thread proof says, for a plate as built and for each kind of fault.

const options: SlabOptionsInput = { marks: { text: [{ value: "ORDER {order}" }], qr: { value: "{order}-QR", module: 1 } } };
let r: PlateResult;
beforeAll(async () => {
  const { kernel, fonts } = await engine();
  r = buildPlate(kernel, {
    parts: [{ id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 3 }],
    options,
    fonts,
    formats: ["stl", "3mf"],
    variables: { order: "10482" },
    deflateRaw: zlibDeflate,
  });
});
afterAll(stopProofThread);

function input(stl = r.stl!, threeMf = r.threeMf!): ProofInput {
  const o = parseOptions(options);
  return {
    stl,
    threeMf,
    options: o,
    pieces: r.pieces.length,
    qrValue: fillValue(o.marks.qr!.value, { order: "10482" }),
    marks: r.layout!.marks,
    labels: r.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
  };
}
const twoThreads = (i: ProofInput): ProofInput => ({ ...i, readThreeMf: readThreeMfOffThread, countEdges: countEdgesOffThread });
const same = (p: Proof) => ({ ok: p.ok, failed: p.failed, rules: p.rules, figures: p.figures, summary: p.summary });

describe("the proof on two threads", () => {
  it("gives the one-thread proof of a plate as built, rules in the same order", async () => {
    const sync = provePlate(input());
    expect(sync.ok).toBe(true);
    const two = await provePlateAsync(twoThreads(input()));
    expect(same(two)).toEqual(same(sync));
    expect(two.rules.map((x) => x.rule).slice(0, 4)).toEqual(["stl", "closed", "oriented", "volume"]);
  });

  it("finds a triangle turned over in the STL as the one-thread proof does", async () => {
    // Corners 2 and 3 of facet 0 swapped (binary STL: 84-byte head, 50 bytes a facet, corners after the 12-byte normal).
    const stl = r.stl!.slice();
    const b = stl.slice(84 + 24, 84 + 36);
    stl.copyWithin(84 + 24, 84 + 36, 84 + 48);
    stl.set(b, 84 + 36);
    const sync = provePlate(input(stl));
    expect(sync.failed).toBe("oriented");
    expect(same(await provePlateAsync(twoThreads(input(stl))))).toEqual(same(sync));
  });

  it("gives the same failure for a 3MF with a body missing, and for bytes that are no zip", async () => {
    const files = unzipSync(r.threeMf!);
    const model = strFromU8(files["3D/3dmodel.model"]!).replace('<component objectid="3"/>\n', "");
    const missing = zipSync({ ...files, "3D/3dmodel.model": strToU8(model) });
    for (const threeMf of [missing, strToU8("not a zip package at all")]) {
      const sync = provePlate(input(undefined, threeMf));
      expect(sync.failed).toBe("three_mf");
      expect(same(await provePlateAsync(twoThreads(input(undefined, threeMf))))).toEqual(same(sync));
    }
  });

  it("does the second thread's work itself when that thread fails", async () => {
    const lost = () => Promise.reject(new Error("the proof's second thread stopped (exit 1)"));
    const sync = provePlate(input());
    expect(same(await provePlateAsync({ ...input(), readThreeMf: lost, countEdges: lost }))).toEqual(same(sync));
  });
});
