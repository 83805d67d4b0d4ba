import { beforeAll, describe, expect, it } from "vitest";
import { engine } from "@/tests/support/engine";
import { asciiStl, box } from "@/tests/support/meshes";
import { importMesh } from "./import";
import type { Unit } from "./io/raw";
import type { Kernel } from "./kernel";
import { bounds } from "./mesh";
import { API_UNITS, unitFindings } from "./units";

let kernel: Kernel;
beforeAll(async () => {
  ({ kernel } = await engine());
});

const BED = { width: 220, depth: 220 };
/** A 20 × 20 × 3 mm token written with coordinates in `scale` units per mm (0.001: saved in metres). */
function read(scale: number, unit?: Unit, source: "upload" | "library" = "upload") {
  const bytes = new TextEncoder().encode(asciiStl(box(20 * scale, 20 * scale, 3 * scale), "token"));
  const r = importMesh(bytes, kernel, { fileName: "token.stl", unit });
  const b = bounds(r.bodies[0]!.mesh);
  return unitFindings(
    {
      index: 2,
      name: "token.stl",
      unit: r.unit,
      source,
      warnings: r.warnings,
      size: [b.max[0] - b.min[0], b.max[1] - b.min[1], b.max[2] - b.min[2]],
    },
    BED,
  );
}

describe("parts read in the wrong unit", () => {
  it("maps the API's unit names to the importer's (1 in = 25.4 mm exactly, NIST SP 811)", () => {
    expect(API_UNITS).toEqual({ mm: "millimeter", cm: "centimeter", m: "meter", in: "inch" });
  });

  it("refuses a token saved in metres (0.02 mm across) and names the fix; read in metres it is clean", () => {
    const f = read(0.001);
    expect(f.map((x) => [x.severity, x.code])).toEqual([
      ["warning", "units_suspect"],
      ["error", "part_too_small"],
    ]);
    expect(f[1]!.message).toBe(
      'Part 2 (token.stl) is 0.020 mm across, read as millimetres: too small to print. Is it in metres? Send units: "m" for it (20.0 mm).',
    );
    expect(f[0]!.message).toMatch(/^Part 2 \(token\.stl\): Read as millimeters, the part is 0\.0200 mm across/);
    expect(read(0.001, "meter")).toEqual([]);
  });

  it("refuses a token saved in inches (0.79 in across) and asks whether it is in inches", () => {
    const f = read(1 / 25.4);
    expect(f.find((x) => x.severity === "error")?.message).toBe(
      'Part 2 (token.stl) is 0.79 mm across, read as millimetres: too small to print. Is it in inches? Send units: "in" for it (20.0 mm).',
    );
    expect(read(1 / 25.4, "inch")).toEqual([]);
  });

  it("refuses a millimetre part sent as inches (508 mm, larger than the bed) and suggests millimetres", () => {
    const f = read(1, "inch");
    expect(f).toEqual([
      {
        severity: "error",
        code: "part_larger_than_bed",
        message:
          "Part 2 (token.stl) is 508.0 × 508.0 mm, read as inches: larger than the 220 × 220 mm bed. Is it in millimetres? Send " +
          'units: "mm" for it (20.0 mm).',
      },
    ]);
  });

  it("tells a stored part's owner to read it again in the parts library", () => {
    expect(read(0.001, undefined, "library").at(-1)?.message).toMatch(
      /Is it in metres\? Read it again in metres in the parts library \(20\.0 mm\)\.$/,
    );
  });

  it("lets a part lie across the bed either way round", () => {
    expect(
      unitFindings(
        { index: 1, name: "rail", unit: "millimeter", source: "upload", warnings: [], size: [200, 100, 5] },
        { width: 120, depth: 250 },
      ),
    ).toEqual([]);
  });
});
