import { inflateRaw, inflateRawSync } from "node:zlib";
import { strFromU8, strToU8, unzipSync, zipSync } from "fflate";
import { beforeAll, describe, expect, it } from "vitest";
import { engine, zlibDeflate } from "@/tests/support/engine";
import { buildPlate, type PlateResult } from "@/lib/geometry/build-plate";
import { hexTile } from "@/lib/geometry/demo-shapes";
import { parseOptions, type SlabOptionsInput } from "@/lib/geometry/options";
import { orientMesh } from "@/lib/geometry/orient";
import { fillValue, provePlate, provePlateAsync, type Proof, type ProofInput } from "./index";

// The worker's proof (the 3MF's model part expanded in node:zlib's thread pool while the STL is
// checked) says exactly what the one-thread proof says.

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
const chunk = (size?: number) => (size ? { chunkSize: Math.max(64, size + 1) } : {});
function input(threeMf = r.threeMf!): ProofInput {
  const o = parseOptions(options);
  return {
    stl: r.stl!,
    threeMf,
    options: o,
    pieces: r.pieces.length,
    qrValue: fillValue(o.marks.qr!.value, { order: "10482" }),
    marks: r.layout!.marks,
    labels: r.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
    inflateRaw: (d, size) => inflateRawSync(d, chunk(size)),
    inflateRawAsync: (d, size) => new Promise((res, rej) => inflateRaw(d, chunk(size), (e, out) => (e ? rej(e) : res(out)))),
  };
}
const same = (p: Proof) => ({ ok: p.ok, failed: p.failed, rules: p.rules, figures: p.figures, summary: p.summary });

describe("provePlateAsync", () => {
  it("gives the one-thread proof of a plate as built", async () => {
    const sync = provePlate(input());
    expect(sync.ok).toBe(true);
    expect(same(await provePlateAsync(input()))).toEqual(same(sync));
  });

  it("gives the same failure for a 3MF with a body missing, and for bytes that are no zip", async () => {
    const files = unzipSync(r.threeMf!);
    const model = strFromU8(files["3D/3dmodel.model"]!).replace('<component objectid="3"/>\n', "");
    const missing = zipSync({ ...files, "3D/3dmodel.model": strToU8(model) });
    for (const threeMf of [missing, strToU8("not a zip package at all")]) {
      const sync = provePlate(input(threeMf));
      expect(sync.failed).toBe("three_mf");
      expect(same(await provePlateAsync(input(threeMf)))).toEqual(same(sync));
    }
  });
});
