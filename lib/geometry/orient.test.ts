import { describe, expect, it } from "vitest";
import { box } from "@/tests/support/meshes";
import { bounds, signedVolume, type IndexedMesh } from "./mesh";
import { largestFlatFace, orientMesh, rotationToDown } from "./orient";

const size = (m: IndexedMesh) => {
  const b = bounds(m);
  return [0, 1, 2].map((a) => Math.round((b.max[a]! - b.min[a]!) * 1e4) / 1e4);
};

/** A wedge (right triangular prism) lying on its long sloped face would be unstable; its largest flat face is its base. */
function wedge(): IndexedMesh {
  // Triangle (0,0)-(30,0)-(0,10) in x/z, extruded 20 in y. Faces: bottom 30×20, back 10×20, slope √1000×20.
  const v = [0, 0, 0, 30, 0, 0, 0, 0, 10, 0, 20, 0, 30, 20, 0, 0, 20, 10];
  // prettier-ignore
  const t = [0,1,2, 3,5,4, 0,4,1, 0,3,4, 0,5,3, 0,2,5, 1,5,2, 1,4,5];
  return { vertProperties: new Float32Array(v), triVerts: new Uint32Array(t) };
}

describe("orientation", () => {
  it("drops the lowest point to z = 0 and centres the part", () => {
    const b = bounds(orientMesh(box(10, 20, 30, [100, 50, -7])));
    expect(b.min).toEqual([-5, -10, 0]);
    expect(b.max).toEqual([5, 10, 30]);
  });

  it("turns a Y-up file so its height runs along Z", () => {
    expect(size(orientMesh(box(10, 30, 5), { yUp: true }))).toEqual([10, 5, 30]);
  });

  it("turns about X and Y in quarter turns and about Z by any angle, keeping volume", () => {
    expect(size(orientMesh(box(10, 20, 30), { turnX: 1 }))).toEqual([10, 30, 20]);
    expect(size(orientMesh(box(10, 20, 30), { turnY: 3 }))).toEqual([30, 20, 10]);
    const r = orientMesh(box(10, 10, 10), { rotateZ: 45 });
    // A 10 mm square turned 45° spans its diagonal, 10·√2 (Pythagoras).
    expect(size(r)[0]).toBeCloseTo(10 * Math.SQRT2, 4);
    expect(signedVolume(r)).toBeCloseTo(1000, 3);
  });

  it("lays a part on its largest flat face that it can stand on", () => {
    const w = wedge();
    // The sloped face is the largest (√1000·20 ≈ 632 mm²) and is a supporting plane, so it wins.
    const n = largestFlatFace(w)!;
    expect(n[0]).toBeCloseTo(10 / Math.sqrt(1000), 6);
    expect(n[2]).toBeCloseTo(30 / Math.sqrt(1000), 6);
    const flat = orientMesh(w, { layFlat: true });
    const b = bounds(flat);
    expect(b.min[2]).toBe(0);
    // Standing on the slope, the height is the triangle's altitude to its hypotenuse: 30·10/√1000.
    expect(b.max[2] - b.min[2]).toBeCloseTo(300 / Math.sqrt(1000), 4);
    expect(signedVolume(w)).toBeCloseTo(3000, 6); // ½·30·10·20
    expect(signedVolume(flat)).toBeCloseTo(3000, 2);
  });

  it("turns any direction to straight down", () => {
    for (const v of [
      [1, 2, 3],
      [0, 0, 1],
      [0, 0, -1],
      [-3, 0.5, -0.1],
    ] as [number, number, number][]) {
      const len = Math.hypot(...v);
      const n = v.map((x) => x / len) as [number, number, number];
      const m = rotationToDown(n);
      const out = [0, 1, 2].map((r) => m[r * 3]! * n[0] + m[r * 3 + 1]! * n[1] + m[r * 3 + 2]! * n[2]);
      expect(out[0]).toBeCloseTo(0, 9);
      expect(out[1]).toBeCloseTo(0, 9);
      expect(out[2]).toBeCloseTo(-1, 9);
    }
  });
});
