import { readFileSync } from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { box, asciiStl, bytes } from "@/tests/support/meshes";
import { importMesh } from "../import";
import { loadKernel, type Kernel } from "../kernel";
import { writeBinaryStl } from "./stl-write";

// Real files no one here wrote: the npm package stl-models (valid models and its "broken" set).
const MODELS = path.join(process.cwd(), "node_modules", "stl-models");
const fixture = (rel: string) => new Uint8Array(readFileSync(path.join(MODELS, rel)));

let kernel: Kernel;
beforeAll(async () => {
  kernel = await loadKernel();
});

const codeOf = (data: Uint8Array, fileName: string, limits?: Parameters<typeof importMesh>[2]["limits"]) => {
  try {
    importMesh(data, kernel, { fileName, limits });
    return "ok";
  } catch (err) {
    return (err as { code?: string }).code ?? String(err);
  }
};

describe("STL import against the stl-models package", () => {
  it.each([
    ["objects/gearwheel.bin.stl", 2444, 1],
    ["objects/gearwheel.ascii.stl", 2444, 1],
    ["polytopes/cube.bin.stl", 12, 0],
    ["polytopes/cube.ascii.stl", 12, 0],
    ["polytopes/tetrahedron.bin.stl", 4, 0],
    ["polytopes/tetrahedronMinusZero.bin.stl", 4, 0],
    ["misc/namelessSolid.ascii.stl", 4, 0],
    ["misc/multiWordName.ascii.stl", 4, 0],
  ])("reads %s (%i triangles, genus %i)", (rel, triangles, genus) => {
    const r = importMesh(fixture(rel), kernel, { fileName: path.basename(rel) });
    expect(r.triangles).toBe(triangles);
    expect(r.bodies).toHaveLength(1);
    expect(r.bodies[0]!.genus).toBe(genus); // the gear wheel is bored through: genus 1
    expect(r.volume).toBeGreaterThan(0);
  });

  it("reads the binary and ASCII gear wheel to the same volume and bounds", () => {
    const a = importMesh(fixture("objects/gearwheel.bin.stl"), kernel, { fileName: "g.stl" });
    const b = importMesh(fixture("objects/gearwheel.ascii.stl"), kernel, { fileName: "g.stl" });
    expect(a.volume).toBeCloseTo(b.volume, 3);
    // the ASCII file prints the same float32 values in decimal: equal to float32 precision
    for (let i = 0; i < 3; i++) {
      expect(a.bounds.min[i]).toBeCloseTo(b.bounds.min[i]!, 5);
      expect(a.bounds.max[i]).toBeCloseTo(b.bounds.max[i]!, 5);
    }
  });

  it.each([
    // tolerant reading: names, a missing endsolid, blank, wrong or NaN normals
    ["broken/missingEndsolid.ascii.stl", "ok"],
    ["broken/missingNormal.ascii.stl", "ok"],
    ["broken/wrongNormal.ascii.stl", "ok"],
    ["broken/wrongNormals.ascii.stl", "ok"],
    ["broken/notANumberNormal.ascii.stl", "ok"],
    ["broken/solidNameMismatch.ascii.stl", "ok"],
    // a binary file whose header starts with "solid": told apart by the size rule, not the word
    ["broken/wrongHeader.bin.stl", "ok"],
    // refusals with their codes
    ["broken/empty.stl", "empty"],
    ["misc/faceless.ascii.stl", "empty"],
    ["broken/incorrectFaceCounter.bin.stl", "bad_triangle_count"],
    ["misc/multiWordName.bin.stl", "bad_triangle_count"], // damaged: bytes replaced as if saved as text
    ["broken/fourVertices.ascii.stl", "malformed"],
    ["broken/quad.ascii.stl", "malformed"],
    ["broken/twoVertices.ascii.stl", "malformed"],
    ["broken/missingFace.ascii.stl", "open_mesh"],
    ["broken/singleFace.ascii.stl", "open_mesh"],
    ["polytopes/triangle.bin.stl", "open_mesh"],
    ["objects/bunny.bin.stl", "open_mesh"], // the scanned bunny has holes
  ])("%s → %s", (rel, code) => {
    expect(codeOf(fixture(rel), path.basename(rel))).toBe(code);
  });

  it("says how many open edges the bunny has", () => {
    try {
      importMesh(fixture("objects/bunny.bin.stl"), kernel, { fileName: "bunny.stl" });
      expect.unreachable();
    } catch (err) {
      const e = err as { code: string; details: { openEdges: number }; message: string };
      expect(e.code).toBe("open_mesh");
      expect(e.details.openEdges).toBeGreaterThan(10);
      expect(e.message).toContain(`${e.details.openEdges} open edges`);
    }
  });
});

describe("STL refusals from tiny hand-built fixtures", () => {
  const cube = writeBinaryStl([box(10, 10, 10)]);

  it("a 15-byte file", () => expect(codeOf(new Uint8Array(15).fill(1), "tiny.stl")).toBe("not_a_mesh"));
  it("a count that lies", () => {
    const lying = cube.slice();
    new DataView(lying.buffer).setUint32(80, 13, true);
    expect(codeOf(lying, "lie.stl")).toBe("bad_triangle_count");
  });
  it("a file cut short", () => expect(codeOf(cube.slice(0, cube.length - 7), "cut.stl")).toBe("bad_triangle_count"));
  it("NaN and Infinity coordinates", () => {
    const bad = cube.slice();
    new DataView(bad.buffer).setFloat32(84 + 12, Number.NaN, true);
    expect(codeOf(bad, "nan.stl")).toBe("non_finite");
    const inf = cube.slice();
    new DataView(inf.buffer).setFloat32(84 + 50 + 16, Number.POSITIVE_INFINITY, true);
    expect(codeOf(inf, "inf.stl")).toBe("non_finite");
    expect(codeOf(bytes(asciiStl(box(1, 1, 1)).replace("vertex 0 0 0", "vertex nan 0 0")), "nan-ascii.stl")).toBe("non_finite");
  });
  it("a garbled number", () =>
    expect(codeOf(bytes(asciiStl(box(1, 1, 1)).replace("vertex 0 0 0", "vertex 0 zero 0")), "g.stl")).toBe("malformed"));
  it("more triangles than the limit", () => expect(codeOf(cube, "big.stl", { maxTriangles: 11 })).toBe("too_many_triangles"));
  it("a file over the size limit, refused before it is read", () =>
    expect(codeOf(cube, "huge.stl", { maxBytes: 100 })).toBe("file_too_large"));
  it("a file ending inside a facet", () => expect(codeOf(bytes(asciiStl(box(1, 1, 1)).split("endloop")[0]!), "end.stl")).toBe("truncated"));
  it("something that is not a mesh at all", () => expect(codeOf(bytes("%PDF-1.7 hello"), "notes.pdf")).toBe("not_a_mesh"));

  it("answers every refusal in well under a second", () => {
    const started = performance.now();
    for (let i = 0; i < 20; i++) codeOf(new Uint8Array(15), "x.stl");
    expect(performance.now() - started).toBeLessThan(1000);
  });
});
