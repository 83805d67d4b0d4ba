import { describe, expect, it } from "vitest";
import { STLLoader } from "three/examples/jsm/loaders/STLLoader.js";
import { hexTile, loft, pawn } from "./demo-shapes";
import { writeBinaryStl } from "./io/stl-write";
import { bounds, openOrMisorientedEdges, signedVolume, triangleCount } from "./mesh";

// Frustum of similar polygons with base areas A1, A2 and height h: V = h/3 (A1 + A2 + √(A1·A2))
// (handbook solid-geometry formula). A prism is the case A1 = A2.
const frustum = (a1: number, a2: number, h: number) => (h / 3) * (a1 + a2 + Math.sqrt(a1 * a2));
// Regular hexagon of circumradius r: area (3√3/2) r².
const hexArea = (r: number) => ((3 * Math.sqrt(3)) / 2) * r * r;

describe("demo part shapes", () => {
  it("hex tile is closed, outward and has the volume of its frusta", () => {
    const across = 30,
      height = 4,
      chamfer = 0.4;
    const mesh = hexTile(across, height, chamfer);
    expect(openOrMisorientedEdges(mesh)).toBe(0);
    const r = across / 2 / Math.cos(Math.PI / 6);
    const ri = r - chamfer / Math.cos(Math.PI / 6);
    const expected = 2 * frustum(hexArea(ri), hexArea(r), chamfer) + hexArea(r) * (height - 2 * chamfer);
    expect(signedVolume(mesh)).toBeCloseTo(expected, 2);
    const b = bounds(mesh);
    expect(b.max[0] - b.min[0]).toBeCloseTo(across, 4); // across flats along x
    expect(b.max[1] - b.min[1]).toBeCloseTo(2 * r, 4); // corner to corner along y
    expect(b.min[2]).toBe(0);
  });

  it("pawn is closed with positive volume below its bounding cylinder", () => {
    const mesh = pawn(48);
    expect(openOrMisorientedEdges(mesh)).toBe(0);
    const b = bounds(mesh);
    const r = (b.max[0] - b.min[0]) / 2;
    const v = signedVolume(mesh);
    expect(v).toBeGreaterThan(0);
    expect(v).toBeLessThan(Math.PI * r * r * (b.max[2] - b.min[2]));
  });

  it("a reversed ring order gives a negative volume (inside out)", () => {
    const sq: [number, number][] = [
      [0, 0],
      [0, 10],
      [10, 10],
      [10, 0],
    ]; // clockwise
    const mesh = loft([
      { z: 0, points: sq },
      { z: 5, points: sq },
    ]);
    expect(signedVolume(mesh)).toBeCloseTo(-500, 6);
  });
});

describe("binary STL writer", () => {
  it("follows the size rule 84 + 50·n and three's STLLoader reads the same triangles", () => {
    const meshes = [hexTile(), pawn(24)];
    const n = meshes.reduce((s, m) => s + triangleCount(m), 0);
    const stl = writeBinaryStl(meshes);
    // 3D Systems StereoLithography Interface Specification (1989): 80-byte header, uint32 count, 50 bytes a facet.
    expect(stl.byteLength).toBe(84 + 50 * n);
    expect(new TextDecoder().decode(stl.subarray(0, 5))).not.toBe("solid");
    expect(new DataView(stl.buffer).getUint32(80, true)).toBe(n);
    // Independent reader: three.js STLLoader (npm three).
    const geometry = new STLLoader().parse(stl.buffer.slice(stl.byteOffset, stl.byteOffset + stl.byteLength) as ArrayBuffer);
    const position = geometry.getAttribute("position");
    expect(position.count).toBe(3 * n);
    geometry.computeBoundingBox();
    const box = geometry.boundingBox!;
    const b = bounds(meshes[0]!);
    expect(box.max.x).toBeCloseTo(b.max[0], 4);
    expect(box.min.z).toBeCloseTo(0, 6);
    // Stored normals point outward: on the bottom cap (all three z = 0) the normal is -z.
    const normal = geometry.getAttribute("normal");
    for (let i = 0; i < position.count; i += 3) {
      if (position.getZ(i) === 0 && position.getZ(i + 1) === 0 && position.getZ(i + 2) === 0) {
        expect(normal.getZ(i)).toBeCloseTo(-1, 5);
      }
    }
  });
});
