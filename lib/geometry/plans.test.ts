/**
 * A kit split over plates: the plates together hold exactly the kit's pieces, each once; they are
 * no more than one over the area bound; each plate builds on its own with its numbers running on
 * from the plate before, and its files pass the plate's proof.
 */
import { deflateRawSync } from "node:zlib";
import { beforeAll, describe, expect, it } from "vitest";
import { cube, discToken, gear } from "@/bench/nesting-kits";
import { engine } from "@/tests/support/engine";
import { fillValue, provePlate } from "@/lib/proof";
import { buildPlate, type PlatePart } from "./build-plate";
import { hexTile } from "./demo-shapes";
import type { FontBook } from "./fonts";
import type { Kernel } from "./kernel";
import { parseOptions, type SlabOptionsInput } from "./options";
import { orientMesh } from "./orient";
import { planPlates } from "./plans";

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

const part = (id: string, mesh: PlatePart["mesh"], quantity: number): PlatePart => ({ id, name: id, mesh: orientMesh(mesh), quantity });
const parts = [part("gear", gear(40, 16), 4), part("hex", hexTile(30, 4), 6), part("disc", discToken(25), 6), part("cube", cube(10), 4)];
const options: SlabOptionsInput = {
  layout: { bed: { width: 130, depth: 130 } },
  marks: { text: [{ value: "ORDER 5120" }], qr: { value: "https://example.com/o/5120" }, numbers: true, outlines: "ring" },
};

describe("a kit split over plates", () => {
  it("holds every piece once, in no more plates than the area bound plus one, each plate built and proven", () => {
    const plan = planPlates(kernel, { parts, options, fonts });
    if ("findings" in plan) throw new Error(plan.findings.map((f) => f.message).join("; "));
    expect(plan.plates.length).toBeGreaterThan(1);
    expect(plan.plates.length).toBeLessThanOrEqual(plan.areaBound + 1);
    const all = plan.plates.flatMap((p) => p.slots).sort((a, b) => a - b);
    expect(all).toEqual(Array.from({ length: 20 }, (_, i) => i + 1));
    let number = 1;
    for (const plate of plan.plates) {
      expect(plate.firstNumber).toBe(number);
      const asked = { ...options, layout: { ...options.layout, pieces: plate.slots, firstNumber: plate.firstNumber } };
      const r = buildPlate(kernel, { parts, options: asked, fonts, formats: ["stl", "3mf"], deflateRaw: (d) => deflateRawSync(d) });
      expect(r.findings.filter((f) => f.severity === "error")).toEqual([]);
      expect(r.pieces.map((p) => p.slot).sort((a, b) => a - b)).toEqual(plate.slots);
      expect(r.pieces.map((p) => p.number)).toEqual(plate.slots.map((_, i) => plate.firstNumber + i));
      const o = parseOptions(asked);
      const proof = provePlate({
        stl: r.stl!,
        threeMf: r.threeMf!,
        options: o,
        pieces: r.pieces.length,
        qrValue: fillValue(o.marks.qr!.value, {}),
        marks: r.layout!.marks,
        labels: r.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
      });
      expect(proof.ok, proof.summary).toBe(true);
      number += plate.slots.length;
    }
  });

  it("a plate naming a piece the kit does not have is refused at the field", () => {
    const r = buildPlate(kernel, { parts, options: { ...options, layout: { pieces: [3, 99] } }, fonts });
    const f = r.findings.find((x) => x.code === "plate_pieces_unknown")!;
    expect(f.field).toEqual(["layout", "pieces"]);
    expect(f.message).toBe("layout.pieces names piece 99, but the kit has 20 pieces; give pieces 1 to 20, in kit order.");
  });
});
