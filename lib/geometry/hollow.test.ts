import { inflateRawSync } from "node:zlib";
import { beforeAll, describe, expect, it } from "vitest";
import { boxShell as box } from "@/tests/support/meshes";
import { buildPlate } from "@/lib/geometry/build-plate";
import type { FontBook } from "@/lib/geometry/fonts";
import { importMesh } from "@/lib/geometry/import";
import { writeBinaryStl } from "@/lib/geometry/io/stl-write";
import type { Kernel } from "@/lib/geometry/kernel";
import { combineMeshes, signedVolume, windingNumber } from "@/lib/geometry/mesh";
import { parseOptions } from "@/lib/geometry/options";
import { provePlate } from "@/lib/proof";
import { engine, zlibDeflate } from "@/tests/support/engine";
import { admesh } from "@/tests/support/stl-bodies";

// A hollow part as a file carries it: an outer skin facing out and the cavity's wall facing in.
let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

describe("hollow parts", () => {
  it("the winding number is 1 inside a closed shell, 0 outside, −1 inside an inside-out one", () => {
    const cube = box([0, 0, 0], [10, 10, 10]);
    expect(windingNumber(cube, 5, 5, 5)).toBeCloseTo(1, 9);
    expect(windingNumber(cube, 15, 5, 5)).toBeCloseTo(0, 9);
    expect(windingNumber(box([0, 0, 0], [10, 10, 10], true), 2, 3, 4)).toBeCloseTo(-1, 9);
  });

  it("keep their cavity: one body of two shells, the volume of the walls (20³ − 10³ mm³)", () => {
    const stl = writeBinaryStl([combineMeshes([box([0, 0, 0], [20, 20, 20]), box([5, 5, 5], [15, 15, 15], true)])]);
    const r = importMesh(stl, kernel, { fileName: "hollow.stl" });
    expect(r.bodies).toHaveLength(1);
    expect(r.bodies[0]!.shells).toBe(2);
    expect(r.bodies[0]!.volume).toBeCloseTo(20 ** 3 - 10 ** 3, 3);
    expect(signedVolume(r.bodies[0]!.mesh)).toBeCloseTo(7000, 3);
    expect(r.repairs.map((x) => x.code)).not.toContain("flipped_inside_out");
  });

  it("an inside-out shell inside nothing is still the exporter's mistake, turned right way out", () => {
    const stl = writeBinaryStl([combineMeshes([box([0, 0, 0], [20, 20, 20]), box([30, 0, 0], [40, 10, 10], true)])]);
    const r = importMesh(stl, kernel, { fileName: "two.stl" });
    expect(r.bodies).toHaveLength(2);
    expect(r.bodies.map((b) => b.shells)).toEqual([1, 1]);
    expect(r.volume).toBeCloseTo(8000 + 1000, 3);
    expect(r.repairs.map((x) => x.code)).toContain("flipped_inside_out");
  });

  it("a plate of hollow parts is proven from its files, and admesh finds the slab and two shells per piece", () => {
    const stl = writeBinaryStl([combineMeshes([box([0, 0, 0], [20, 20, 20]), box([5, 5, 5], [15, 15, 15], true)])]);
    const part = importMesh(stl, kernel, { fileName: "hollow.stl" });
    const options = parseOptions({ slab: { thickness: 1.2 }, layout: { bed: { width: 200, depth: 200 } } });
    const r = buildPlate(kernel, {
      parts: [{ id: "part-1", name: "Lantern", mesh: part.bodies[0]!.mesh, quantity: 2 }],
      options,
      fonts,
      formats: ["stl", "3mf"],
      deflateRaw: zlibDeflate,
    });
    expect(r.findings.filter((f) => f.severity === "error")).toEqual([]);
    const proof = provePlate({
      stl: r.stl!,
      threeMf: r.threeMf!,
      inflateRaw: (d) => inflateRawSync(d),
      options,
      pieces: r.pieces.length,
      shells: r.pieces.map(() => part.bodies[0]!.shells),
      marks: r.layout!.marks,
      labels: r.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
    });
    expect(proof.rules.filter((x) => !x.pass)).toEqual([]);
    expect(proof.ok).toBe(true);
    // Debian's admesh: 1 slab + 2 pieces × 2 shells = 5 parts, nothing to fix.
    const a = admesh(r.stl!);
    expect([a.parts, a.edgesFixed, a.facetsReversed]).toEqual([5, 0, 0]);
  });
});
