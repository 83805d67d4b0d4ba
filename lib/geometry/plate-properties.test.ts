/**
 * Every plate the options table allows is either refused with a finding that names its field, or
 * exported clean: checked on the STL bytes by Debian's admesh (parts = pieces + 1, nothing to repair)
 * and by a kernel-free reading (every piece wholly on the slab, the floor kept under every engraving).
 * fast-check draws the options (seeded, so a failure replays); SLAB_PROPERTY_RUNS sets how many
 * (bench/ runs more).
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import fc from "fast-check";
import { beforeAll, describe, expect, it } from "vitest";
import { engine } from "@/tests/support/engine";
import { box } from "@/tests/support/meshes";
import { rasterizeStl } from "@/tests/support/raster";
import { admesh, bodyStl, lowestTopSurface, slabAndPieces } from "@/tests/support/stl-bodies";
import { buildPlate, newPartCache, type PlatePart } from "./build-plate";
import { hexTile, pawn } from "./demo-shapes";
import type { FontBook } from "./fonts";
import { importMesh } from "./import";
import type { Kernel } from "./kernel";
import { combineMeshes, type IndexedMesh } from "./mesh";
import { floorUnderMarks, parseOptions, type SlabOptionsInput } from "./options";
import { orientMesh } from "./orient";
import { provePlate } from "@/lib/proof";
import { inflateRawSync } from "node:zlib";

let kernel: Kernel;
let fonts: FontBook;
let shapes: Record<string, IndexedMesh>;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
  const model = (file: string) =>
    orientMesh(
      combineMeshes(
        importMesh(readFileSync(path.join(process.cwd(), "node_modules/stl-models", file)), kernel, { fileName: file }).bodies.map(
          (b) => b.mesh,
        ),
      ),
    );
  shapes = {
    // Meshes nobody here made (the stl-models package), and our own demo shapes.
    gear: model("objects/gearwheel.bin.stl"),
    tetrahedron: model("polytopes/tetrahedronIrregular.bin.stl"),
    tile: orientMesh(hexTile()),
    pawn: orientMesh(pawn()),
    counter: orientMesh(box(6, 6, 6)),
    bar: orientMesh(box(40, 5, 4)),
    plaque: orientMesh(box(30, 20, 2)),
  };
});

const RUNS = Number(process.env.SLAB_PROPERTY_RUNS ?? 300);
const cache = newPartCache();
const step = (min: number, max: number, by: number) =>
  fc.integer({ min: Math.round(min / by), max: Math.round(max / by) }).map((n) => Math.round(n * by * 1000) / 1000);
const depth = fc.oneof({ arbitrary: step(0.1, 1.2, 0.1), weight: 4 }, { arbitrary: fc.constant("max" as const), weight: 1 });
const relief = fc.constantFrom("engrave" as const, "emboss" as const);
const layer = fc.constantFrom(0.1, 0.12, 0.15, 0.2, 0.25, 0.3);

const optionsArb: fc.Arbitrary<SlabOptionsInput> = fc
  .record({
    slab: fc.record({
      shape: fc.constantFrom("rounded-rect" as const, "disc" as const, "contour" as const),
      thickness: step(0.6, 3, 0.1),
      gap: fc.oneof(step(0.1, 0.5, 0.05), fc.constantFrom(0.2, 0.3, 0.4)),
      cornerRadius: step(0, 100, 1),
      margin: step(0, 20, 0.5),
    }),
    layout: fc.record({
      spacing: step(0, 10, 0.5),
      copies: fc.integer({ min: 1, max: 2 }),
      bed: fc.constantFrom({ width: 220, depth: 220 }, { width: 180, depth: 180 }, { width: 300, depth: 300 }),
    }),
    marks: fc.record({
      text: fc.array(fc.record({ value: fc.stringMatching(/^[A-Z0-9]{1}[A-Z0-9 ]{0,23}$/), size: step(2, 10, 0.5), relief, depth }), {
        maxLength: 2,
      }),
      qr: fc.option(
        fc.record({
          value: fc.webUrl({ size: "small" }),
          module: step(0.8, 2, 0.1),
          level: fc.constantFrom("L" as const, "M" as const, "Q" as const, "H" as const),
          relief,
          depth,
        }),
        { nil: undefined },
      ),
      numbers: fc.boolean(),
      numberStyle: fc.record({ size: step(3, 8, 0.5), depth: fc.option(depth, { nil: undefined }) }),
      outlines: fc.constantFrom("ring" as const, "pocket" as const, "none" as const),
      ringStyle: fc.record({ width: step(0.4, 2, 0.1), clearance: step(0.4, 2, 0.1), depth: fc.option(depth, { nil: undefined }) }),
    }),
    layerHeight: layer,
    firstLayerHeight: layer,
    nozzle: fc.constantFrom(0.4, 0.6),
  })
  .map((o) => {
    // Options set to undefined are left out, as a client leaves them out.
    const marks = { ...o.marks, ...(o.marks.qr ? {} : { qr: undefined }) };
    if (!marks.qr) delete marks.qr;
    return { ...o, marks } as SlabOptionsInput;
  });

const partsArb = fc
  .uniqueArray(fc.constantFrom("gear", "tetrahedron", "tile", "pawn", "counter", "bar", "plaque"), { minLength: 1, maxLength: 3 })
  .chain((names) =>
    fc.tuple(fc.constant(names), fc.array(fc.integer({ min: 1, max: 4 }), { minLength: names.length, maxLength: names.length })),
  );

describe("every plate either is refused at a field or exports clean", () => {
  it(`${RUNS} seeded cases over the options table`, () => {
    let built = 0;
    fc.assert(
      fc.property(optionsArb, partsArb, (options, [names, quantities]) => {
        const parts: PlatePart[] = names.map((n, i) => ({ id: n, name: n, mesh: shapes[n]!, quantity: quantities[i]! }));
        // One part cache for every case, as a worker's build thread keeps one between plates.
        const r = buildPlate(kernel, { parts, options, fonts, formats: ["stl", "3mf"], variables: { date: "2026-12-03" }, cache });
        const errors = r.findings.filter((f) => f.severity === "error");
        if (errors.length) {
          if (process.env.SLAB_PROPERTY_LOG)
            console.log(
              "REFUSED",
              errors.map((e) => e.code).join(","),
              errors.some((e) => e.code === "off_slab")
                ? JSON.stringify({ options, names, quantities, m: errors.map((e) => e.message) })
                : "",
            );
          // Refused: each error says which option (or which piece) to change.
          for (const e of errors) expect(e.field ?? e.piece, `${e.code}: ${e.message}`).toBeDefined();
          expect(r.stl).toBeUndefined();
          return;
        }
        built++;
        // The plate's own proof (lib/proof, kernel-free) on the exported STL and 3MF.
        const o = parseOptions(options);
        const proof = provePlate({
          stl: r.stl!,
          threeMf: r.threeMf!,
          options: o,
          pieces: r.pieces.length,
          qrValue: o.marks.qr?.value,
          marks: r.layout!.marks,
          inflateRaw: (d) => inflateRawSync(d),
        });
        expect(
          proof.rules.filter((x) => !x.pass),
          proof.summary,
        ).toEqual([]);
        const a = admesh(r.stl!);
        expect({
          parts: a.parts,
          disconnected: a.disconnected,
          fixed: a.edgesFixed,
          reversed: a.facetsReversed,
          backwards: a.backwardsEdges,
        }).toEqual({ parts: r.pieces.length + 1, disconnected: 0, fixed: 0, reversed: 0, backwards: 0 });
        const { slab, pieces } = slabAndPieces(r.stl!);
        expect(pieces).toHaveLength(r.pieces.length);
        // The floor under the deepest engraving (rings and pockets included).
        const floor = lowestTopSurface(slab);
        if (Number.isFinite(floor)) expect(floor).toBeGreaterThanOrEqual(floorUnderMarks(o) - 1e-4);
        // Every piece's base vertices have slab under them (a height map of the slab's own triangles,
        // 0.2 mm pixels: a vertex on the slab's very edge, with no margin, may fall in the next pixel).
        const map = rasterizeStl(bodyStl(slab), 5, {
          minX: slab.min[0] - 1,
          minY: slab.min[1] - 1,
          maxX: slab.max[0] + 1,
          maxY: slab.max[1] + 1,
        });
        const near = (x: number, y: number) => {
          const px = Math.floor((x - map.originX) * map.pxPerMm),
            py = map.height - 1 - Math.floor((y - map.originY) * map.pxPerMm);
          for (let dy = -1; dy <= 1; dy++) for (let dx = -1; dx <= 1; dx++) if (map.z[(py + dy) * map.width + px + dx]! > 0) return true;
          return false;
        };
        for (const p of pieces) {
          for (let i = 0; i < p.tri.length; i += 3) {
            if (p.tri[i + 2]! > p.min[2] + 1e-4) continue;
            expect(near(p.tri[i]!, p.tri[i + 1]!), `piece at (${p.tri[i]}, ${p.tri[i + 1]}) off the slab`).toBe(true);
          }
        }
      }),
      { numRuns: RUNS, seed: 20261203, endOnFailure: true },
    );
    // The table is not all refusals: most plates build.
    expect(built).toBeGreaterThan(RUNS * 0.3);
  }, 600_000);
});
