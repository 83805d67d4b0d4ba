import { beforeAll, describe, expect, it } from "vitest";
import { asciiStl, box, bytes, concat } from "@/tests/support/meshes";
import { importMesh, detectFormat } from "./import";
import { writeBinaryStl } from "./io/stl-write";
import { loadKernel, type Kernel } from "./kernel";
import { openOrMisorientedEdges, type IndexedMesh } from "./mesh";

let kernel: Kernel;
beforeAll(async () => {
  kernel = await loadKernel();
});

const stl = (...meshes: IndexedMesh[]) => writeBinaryStl(meshes);

describe("repairs", () => {
  it("closes a mesh whose corners were written with tiny jitter (tolerance weld)", () => {
    const soup = stl(box(20, 20, 20));
    const view = new DataView(soup.buffer);
    // Nudge one corner of every other facet by 2 µm: exact welding leaves open edges.
    for (let f = 0; f < 12; f += 2) {
      const off = 84 + 50 * f + 12;
      view.setFloat32(off, view.getFloat32(off, true) + 0.002, true);
    }
    const r = importMesh(soup, kernel, { fileName: "jitter.stl" });
    expect(r.repairs.map((x) => x.code)).toContain("tolerance_welded");
    expect(openOrMisorientedEdges(r.bodies[0]!.mesh)).toBe(0);
    expect(r.volume).toBeCloseTo(8000, 0);
  });

  it("flips a whole inside-out mesh and says so", () => {
    const m = box(10, 10, 10);
    for (let i = 0; i < m.triVerts.length; i += 3) [m.triVerts[i + 1], m.triVerts[i + 2]] = [m.triVerts[i + 2]!, m.triVerts[i + 1]!];
    const r = importMesh(stl(m), kernel, { fileName: "inside-out.stl" });
    expect(r.volume).toBeCloseTo(1000, 6);
    expect(r.repairs).toEqual([expect.objectContaining({ code: "flipped_inside_out", count: 1 })]);
  });

  it("turns single triangles that face the wrong way", () => {
    const m = box(10, 10, 10);
    [m.triVerts[4], m.triVerts[5]] = [m.triVerts[5]!, m.triVerts[4]!];
    const r = importMesh(stl(m), kernel, { fileName: "one-flipped.stl" });
    expect(r.repairs).toEqual([expect.objectContaining({ code: "reoriented", count: 1 })]);
    expect(openOrMisorientedEdges(r.bodies[0]!.mesh)).toBe(0);
    expect(r.volume).toBeCloseTo(1000, 6);
  });

  it("drops triangles that collapse to a line or point", () => {
    const text = asciiStl(box(5, 5, 5)).replace(
      "endsolid",
      "facet normal 0 0 0\nouter loop\nvertex 0 0 0\nvertex 0 0 0\nvertex 5 0 0\nendloop\nendfacet\nendsolid",
    );
    const r = importMesh(bytes(text), kernel, { fileName: "needle.stl" });
    expect(r.triangles).toBe(12);
    expect(r.repairs).toEqual([expect.objectContaining({ code: "dropped_degenerate", count: 1 })]);
  });

  it("refuses a closed but flat, double-sided surface as zero volume", () => {
    // A tetrahedron squashed flat: every edge shared by two triangles, but no volume inside.
    const sheet: IndexedMesh = {
      vertProperties: new Float32Array([0, 0, 0, 10, 0, 0, 0, 10, 0, 3, 3, 0]),
      triVerts: new Uint32Array([0, 2, 1, 0, 1, 3, 1, 2, 3, 0, 3, 2]),
    };
    expect(() => importMesh(stl(sheet), kernel, { fileName: "sheet.stl" })).toThrow(expect.objectContaining({ code: "zero_volume" }));
  });

  it("refuses an edge shared by more than two triangles", () => {
    // Two cubes sharing one edge exactly.
    const r = () => importMesh(stl(box(10, 10, 10), box(10, 10, 10, [10, 10, 0])), kernel, { fileName: "edge.stl" });
    expect(r).toThrow(expect.objectContaining({ code: "not_manifold" }));
  });
});

describe("several bodies in one file", () => {
  it("offers each disjoint closed shell as its own body, named after the file", () => {
    const r = importMesh(stl(box(10, 10, 10), box(5, 5, 5, [20, 0, 0]), box(4, 4, 8, [0, 20, 0])), kernel, { fileName: "whole-kit.stl" });
    expect(r.bodies.map((b) => b.name)).toEqual(["whole-kit 1", "whole-kit 2", "whole-kit 3"]);
    expect(r.bodies.map((b) => Math.round(b.volume))).toEqual([1000, 125, 128]);
  });

  it("keeps a hollow body (a shell inside a shell) as two bodies, both outward", () => {
    const outer = box(20, 20, 20);
    const inner = box(10, 10, 10, [5, 5, 5]);
    const r = importMesh(stl(concat(outer, inner)), kernel, { fileName: "nested.stl" });
    expect(r.bodies).toHaveLength(2);
    for (const b of r.bodies) expect(b.volume).toBeGreaterThan(0);
  });
});

describe("units", () => {
  it("reads STL as millimetres unless told otherwise", () => {
    const r = importMesh(stl(box(2, 1, 1)), kernel, { fileName: "in.stl", unit: "inch" });
    expect(r.bounds.max[0]).toBeCloseTo(50.8, 4);
    expect(r.volume).toBeCloseTo(2 * 25.4 ** 3, 1);
  });

  it("flags a part that looks like it was saved in inches or metres, with a suggestion", () => {
    const r = importMesh(stl(box(0.5, 0.3, 0.2)), kernel, { fileName: "inches.stl" });
    expect(r.warnings).toEqual([expect.objectContaining({ code: "units_suspect", suggestion: { unit: "inch", scale: 25.4 } })]);
    const m = importMesh(stl(box(0.05, 0.03, 0.02)), kernel, { fileName: "metres.stl" });
    expect(m.warnings[0]?.suggestion).toEqual({ unit: "meter", scale: 1000 });
    const big = importMesh(stl(box(40000, 20000, 5000)), kernel, { fileName: "microns.stl" });
    expect(big.warnings[0]?.suggestion).toEqual({ unit: "micron", scale: 0.001 });
    expect(importMesh(stl(box(40, 20, 5)), kernel, { fileName: "ok.stl" }).warnings).toEqual([]);
  });
});

describe("format detection by content, not by name", () => {
  it("tells formats apart whatever the extension says", () => {
    expect(detectFormat(stl(box(1, 1, 1)), "part.obj")).toBe("stl");
    expect(detectFormat(bytes(asciiStl(box(1, 1, 1))), "part.txt")).toBe("stl");
    expect(detectFormat(bytes("v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 3\n"), "part.stl")).toBe("obj");
  });
});

describe("kernel objects", () => {
  it("are all freed after imports, successful or not", () => {
    const before = kernel.live();
    importMesh(stl(box(10, 10, 10)), kernel, { fileName: "a.stl" });
    try {
      importMesh(stl(box(10, 10, 10), box(10, 10, 10, [10, 10, 0])), kernel, { fileName: "b.stl" });
    } catch {
      // expected refusal
    }
    expect(kernel.live()).toBe(before);
  });
});
