import { beforeAll, describe, expect, it } from "vitest";
import { componentBomb, inflateBomb, millionVertexFile } from "@/tests/support/bombs";
import { IMPORT_LIMITS, importMesh } from "../import";
import { loadKernel, type Kernel } from "../kernel";
import { readObj } from "./obj-read";

// Hostile packages that are small on the wire and huge once read. Each must end in a typed
// MeshImportError code, before the arrays the attack aims at are built.
let kernel: Kernel;
beforeAll(async () => {
  kernel = await loadKernel();
});

const refusal = (file: Uint8Array, name: string, limits = {}) => {
  try {
    importMesh(file, kernel, { fileName: name, limits });
  } catch (err) {
    return err as { code: string; details?: Record<string, unknown> };
  }
  throw new Error(`${name} was imported`);
};

describe("3MF resource limits", () => {
  // ASVS 4.0 V12.1.2 (compressed files checked against the uncompressed size) and V13/V11.1.4-style
  // bounds on what one request may make the server do.
  it("refuses the 4 096-body component bomb (1.2 kB of nested components) by counting, before placing any mesh", () => {
    const file = componentBomb(12, 2);
    expect(file.byteLength).toBeLessThan(2_000);
    const started = performance.now();
    const err = refusal(file, "nest.3mf");
    expect(err.code).toBe("too_many_bodies");
    expect(err.details).toMatchObject({ bodies: 4096, limit: IMPORT_LIMITS.maxBodies });
    expect(performance.now() - started).toBeLessThan(500);
  });

  it("counts the component tree without walking it: 2^40 bodies are refused as fast as 4 096", () => {
    const started = performance.now();
    expect(refusal(componentBomb(40, 2), "deep.3mf").code).toBe("too_many_bodies");
    expect(performance.now() - started).toBeLessThan(500);
  });

  it("refuses a component tree whose placed triangles pass the triangle limit although each object is small", () => {
    // 4 096 cubes × 12 triangles = 49 152 placed triangles from 12 + 0 declared ones.
    const err = refusal(componentBomb(12, 2), "nest.3mf", { maxBodies: 10_000, maxTriangles: 40_000 });
    expect(err.code).toBe("too_many_triangles");
    expect(err.details).toMatchObject({ triangles: 49_152, limit: 40_000 });
  });

  it("still reads a modest component tree (8 placed cubes)", () => {
    const r = importMesh(componentBomb(3, 2), kernel, { fileName: "eight.3mf" });
    expect(r.bodies).toHaveLength(8);
  });

  it("refuses the million-vertex file (a cube plus a million vertices no triangle uses)", { timeout: 30_000 }, () => {
    const file = millionVertexFile(1_000_000);
    expect(file.byteLength).toBeLessThan(100_000);
    const err = refusal(file, "dots.3mf");
    expect(err.code).toBe("too_many_vertices");
    expect(err.details).toMatchObject({ vertices: 1_000_008, triangles: 12 });
  });

  it("stops reading vertices the moment the file passes the vertex limit", () => {
    const err = refusal(millionVertexFile(5_000), "dots.3mf", { maxVertices: 1_000 });
    expect(err.code).toBe("too_many_vertices");
    expect(err.details).toMatchObject({ vertices: 1_001, limit: 1_000 });
  });

  it("refuses an inflate bomb whose directory lies about its size, stopping at the inflate budget", { timeout: 60_000 }, () => {
    const file = inflateBomb(400, false); // 400 MB of content, the directory says about 1 kB
    expect(file.byteLength).toBeLessThan(1_000_000);
    const err = refusal(file, "puff.3mf");
    expect(err.code).toBe("archive_too_large");
    expect(err.details).toMatchObject({ limit: IMPORT_LIMITS.maxInflatedBytes });
  });

  it("refuses an honest inflate bomb from its directory at once", () => {
    const started = performance.now();
    expect(refusal(inflateBomb(400, true), "puff.3mf").code).toBe("archive_too_large");
    expect(performance.now() - started).toBeLessThan(500);
  });

  it("keeps the inflate budget to what the triangle and vertex limits can need", () => {
    // ~55 bytes per <triangle> and ~60 per <vertex> at the limits, with room for indentation and colour attributes.
    expect(IMPORT_LIMITS.maxInflatedBytes).toBeLessThanOrEqual(320 * 1024 * 1024);
    expect(IMPORT_LIMITS.maxInflatedBytes).toBeGreaterThanOrEqual(IMPORT_LIMITS.maxTriangles * 55 + IMPORT_LIMITS.maxVertices * 60);
  });
});

describe("OBJ vertex limits", () => {
  it("refuses a file of vertices no face uses, and one past the vertex limit", () => {
    const dots = new TextEncoder().encode("v 0 0 0\n".repeat(70_000) + "f 1 2 3\n");
    expect(() => readObj(dots, "dots.obj", IMPORT_LIMITS)).toThrow(expect.objectContaining({ code: "too_many_vertices" }));
    const many = new TextEncoder().encode("v 0 0 0\n".repeat(2_000) + "f 1 2 3\n");
    expect(() => readObj(many, "many.obj", { ...IMPORT_LIMITS, maxVertices: 1_000 })).toThrow(
      expect.objectContaining({ code: "too_many_vertices", details: expect.objectContaining({ vertices: 1_001 }) }),
    );
  });
});
