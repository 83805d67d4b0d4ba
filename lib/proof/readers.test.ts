import { inflateRaw, inflateRawSync } from "node:zlib";
import { strToU8, zipSync } from "fflate";
import { describe, expect, it } from "vitest";
import { convexHull, convexOverlap, ConvexShape, outsideBy, TriGrid, withinPlanes, halfPlanes } from "./planar";
import { readWeldedStl, StlProofError } from "./stl";
import { readModel, readThreeMfBodies, readThreeMfBodiesAsync, ThreeMfProofError } from "./three-mf";
import { connectedBodies, edgeReport, hollows, windingNumber } from "./topology";

// The proof's readers and 2D helpers against their definitions: the fast paths give what the plain
// ones give, and what the formats and formulas say.

/** A seeded generator (mulberry32), so a failure repeats. */
function rng(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A binary STL (80-byte header, uint32 count, 50 bytes a facet) of the given triangles (9 numbers each). */
function stlOf(tris: number[][]): Uint8Array {
  const out = new Uint8Array(84 + 50 * tris.length);
  const v = new DataView(out.buffer);
  v.setUint32(80, tris.length, true);
  tris.forEach((t, i) => t.forEach((x, k) => v.setFloat32(84 + 50 * i + 12 + 4 * k, x, true)));
  return out;
}
/** A box's 12 triangles, facing out (or in), as corner coordinates. */
function boxTris([x0, y0, z0]: number[], [x1, y1, z1]: number[], inward = false): number[][] {
  const v = [
    [x0, y0, z0],
    [x1, y0, z0],
    [x1, y1, z0],
    [x0, y1, z0],
    [x0, y0, z1],
    [x1, y0, z1],
    [x1, y1, z1],
    [x0, y1, z1],
  ] as [number, number, number][];
  const f = [
    [0, 2, 1],
    [0, 3, 2],
    [4, 5, 6],
    [4, 6, 7],
    [0, 1, 5],
    [0, 5, 4],
    [1, 2, 6],
    [1, 6, 5],
    [2, 3, 7],
    [2, 7, 6],
    [3, 0, 4],
    [3, 4, 7],
  ];
  return f.map(([a, b, c]) => (inward ? [a, c, b] : [a, b, c]).flatMap((k) => v[k!]!));
}

describe("the STL weld", () => {
  it("keeps a soup of unshared triangles apart: 3n corners, 3n open edges (its table grows past its first size)", () => {
    const r = rng(1);
    const soup = Array.from({ length: 3000 }, () => Array.from({ length: 9 }, () => r() * 100));
    const m = readWeldedStl(stlOf(soup));
    expect(m.positions.length / 3).toBe(9000);
    expect(edgeReport(m)).toMatchObject({ edges: 9000, open: 9000, nonManifold: 0 });
    expect(connectedBodies(m)).toHaveLength(3000);
  });

  it("welds −0 with 0 (IEEE 754: they compare equal) and a box to its 8 corners, 18 edges, one body of volume w·d·h", () => {
    const tris = boxTris([-0, 0, 0], [2, 3, 4]);
    const m = readWeldedStl(stlOf(tris.map((t) => t.map((x) => (x === 0 ? -0 : x)))));
    expect(m.positions.length / 3).toBe(8);
    expect(edgeReport(m)).toMatchObject({ edges: 18, open: 0, nonManifold: 0, misoriented: 0 });
    const [b] = connectedBodies(m);
    expect(b!.volume).toBeCloseTo(24, 10);
    expect(b!.area).toBeCloseTo(2 * (6 + 8 + 12), 10); // 2(wd + wh + dh)
  });

  it("refuses a corner that is no finite number (binary32 with every exponent bit set: NaN or infinity), naming it", () => {
    const tris = boxTris([0, 0, 0], [1, 1, 1]);
    tris[3]![4] = NaN; // the second corner of facet 4: a corner not seen before it
    expect(() => readWeldedStl(stlOf(tris))).toThrow(StlProofError);
    tris[3]![4] = Infinity;
    expect(() => readWeldedStl(stlOf(tris))).toThrow(/^The STL has a vertex that is not a finite number \(vertex \d+\)\.$/);
  });
});

describe("winding numbers and hollows", () => {
  const m = readWeldedStl(stlOf([...boxTris([0, 0, 0], [10, 10, 10]), ...boxTris([3, 3, 3], [7, 7, 7], true)]));
  const bodies = connectedBodies(m);

  it("a closed outward surface winds once about a point inside it and not at all about one outside (Van Oosterom & Strackee)", () => {
    expect(windingNumber(m, bodies[0]!.tris, 1, 2, 3)).toBeCloseTo(1, 10);
    expect(windingNumber(m, bodies[0]!.tris, 11, 2, 3)).toBeCloseTo(0, 10);
    expect(windingNumber(m, bodies[1]!.tris, 5, 5, 5)).toBeCloseTo(-1, 10); // inside out: −1
  });

  it("an inside-out box inside a box is that box's hollow; outside it, it is none", () => {
    expect(hollows(m, bodies).get(bodies[1]!)).toBe(bodies[0]);
    const apart = readWeldedStl(stlOf([...boxTris([0, 0, 0], [10, 10, 10]), ...boxTris([13, 3, 3], [17, 7, 7], true)]));
    expect(hollows(apart, connectedBodies(apart)).size).toBe(0);
  });
});

describe("2D helpers against the plain separating-axis test", () => {
  const r = rng(7);
  const polygon = (n: number, cx: number, cy: number, s: number) =>
    convexHull(Float64Array.from({ length: 2 * n }, (_, i) => (i % 2 ? cy : cx) + (r() - 0.5) * s));

  it("ConvexShape.overlaps(p) is convexOverlap(p, shape) for random hulls and triangles", () => {
    let overlaps = 0;
    for (let k = 0; k < 300; k++) {
      const hull = polygon(3 + Math.floor(r() * 200), 0, 0, 10);
      const shape = new ConvexShape(hull);
      for (let j = 0; j < 20; j++) {
        const tri = polygon(3, (r() - 0.5) * 14, (r() - 0.5) * 14, 4);
        const eps = j % 2 ? 1e-3 : 0.5;
        const want = convexOverlap(tri, hull, eps);
        overlaps += want ? 1 : 0;
        expect(shape.overlaps(tri, eps)).toBe(want);
      }
    }
    expect(overlaps).toBeGreaterThan(500); // both answers were asked for
  });

  it("withinPlanes(planes, p, tol) is outsideBy(planes, p) <= tol", () => {
    const seen = new Set<boolean>();
    for (let k = 0; k < 300; k++) {
      const hull = polygon(3 + Math.floor(r() * 60), 0, 0, 100);
      const ring = Array.from({ length: hull.length / 2 }, (_, i) => [hull[2 * i]!, hull[2 * i + 1]!] as [number, number]);
      const planes = halfPlanes(ring);
      const pts = polygon(3 + Math.floor(r() * 40), (r() - 0.5) * 80, (r() - 0.5) * 80, 20);
      const tol = r() < 0.5 ? 0.01 : 2;
      const want = outsideBy(planes, pts) <= tol;
      seen.add(want);
      expect(withinPlanes(planes, pts, tol)).toBe(want);
    }
    expect(seen.size).toBe(2);
  });

  it("TriGrid answers as a scan of every triangle, by boxes and after it builds its grid", () => {
    const tris = Float64Array.from({ length: 6 * 400 }, () => r() * 50);
    const grid = new TriGrid(tris);
    for (let q = 0; q < 200; q++) {
      const poly = polygon(3 + Math.floor(r() * 5), r() * 50, r() * 50, 6);
      let want = false;
      for (let t = 0; t < 400 && !want; t++) want = convexOverlap(tris.subarray(6 * t, 6 * t + 6), poly, 1e-3);
      expect(grid.overlaps(poly, 1e-3)).toBe(want);
    }
  });
});

/** A 3MF core model: mesh objects (vertices, triangles) and one build item each. */
function modelXml(objects: { vertices: number[][]; triangles: number[][] }[], form: (v: number[], t: boolean) => string): string {
  const body = objects
    .map(
      (o, i) =>
        `<object id="${i + 1}" ` +
        `type="model"><mesh><vertices>\n${o.vertices.map((v) => form(v, false)).join("\n")}\n</vertices><triangles>\n` +
        `${o.triangles.map((t) => form(t, true)).join("\n")}\n</triangles></mesh></object>`,
    )
    .join("\n");
  return `<?xml version="1.0" encoding="UTF-8"?>\n<model unit="millimeter" xmlns="http://schemas.microsoft.com/3dmanufacturing/core/2015/02"><resources>\n${body}\n</resources><build>${objects.map((_, i) => `<item objectid="${i + 1}"/>`).join("")}</build></model>`;
}
const cube = (x0: number, s: number, inward = false) => {
  const v = [
    [0, 0, 0],
    [1, 0, 0],
    [1, 1, 0],
    [0, 1, 0],
    [0, 0, 1],
    [1, 0, 1],
    [1, 1, 1],
    [0, 1, 1],
  ].map((p) => p.map((c) => x0 + c * s));
  const f = [
    [0, 2, 1],
    [0, 3, 2],
    [4, 5, 6],
    [4, 6, 7],
    [0, 1, 5],
    [0, 5, 4],
    [1, 2, 6],
    [1, 6, 5],
    [2, 3, 7],
    [2, 7, 6],
    [3, 0, 4],
    [3, 4, 7],
  ];
  return { vertices: v, triangles: inward ? f.map(([a, b, c]) => [a!, c!, b!]) : f };
};
const plain = (v: number[], t: boolean) =>
  t ? `<triangle v1="${v[0]}" v2="${v[1]}" v3="${v[2]}"/>` : `<vertex x="${v[0]}" y="${v[1]}" z="${v[2]}"/>`;
/** The same values as the XML grammar also allows: other spacing and attribute order, exponents, a sign. */
const odd = (v: number[], t: boolean) =>
  t
    ? `<triangle  v3="${v[2]}"\tv1='${v[0]}' v2="${v[1]}" />`
    : `<vertex z="${v[2]!.toExponential()}"  x="+${v[0]}" y = "${v[1]}"></vertex>`;

describe("the 3MF reader", () => {
  // One object of two shells (a 4 mm cube holding an inside-out 2 mm one) and a 1.5 mm cube.
  const objects = [
    {
      vertices: [...cube(0, 4).vertices, ...cube(1, 2).vertices],
      triangles: [...cube(0, 4).triangles, ...cube(1, 2, true).triangles.map((t) => t.map((k) => k + 8))],
    },
    cube(10, 1.5),
  ];

  it("reads each mesh's shells, triangles, bounds and signed volume (V = a³: 64, −8, 3.375 mm³)", () => {
    const read = readModel(strToU8(modelXml(objects, plain)));
    expect(read.problems).toEqual([]);
    expect(read.bodies.map((b) => b.triangles)).toEqual([24, 12]);
    expect(read.shells.map((s) => s.triangles)).toEqual([12, 12, 12]);
    expect(read.shells.map((s) => s.volume)).toEqual([64, -8, 3.375].map((v) => expect.closeTo(v, 12)));
    expect(read.shells[1]).toMatchObject({ min: [1, 1, 1], max: [3, 3, 3] });
  });

  it("reads the XML's other spellings of the same values as the plain ones", () => {
    expect(readModel(strToU8(modelXml(objects, odd)))).toEqual(readModel(strToU8(modelXml(objects, plain))));
  });

  it("reads a zip through its directory (zlib) as fflate's unzip reads it, and refuses a size the directory misstates", async () => {
    const files = {
      "[Content_Types].xml": strToU8('<?xml version="1.0"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"/>'),
      "_rels/.rels": strToU8(
        '<?xml version="1.0"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Target="/3D/3dmodel.model" Id="rel0" Type="http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel"/></Relationships>',
      ),
      "3D/3dmodel.model": strToU8(modelXml(objects, plain)),
    };
    const zip = zipSync(files, { level: 6 });
    const sync = (d: Uint8Array, size?: number) => inflateRawSync(d, size ? { chunkSize: Math.max(64, size + 1) } : {});
    const byFflate = readThreeMfBodies(zip);
    expect(readThreeMfBodies(zip, sync)).toEqual(byFflate);
    expect(
      await readThreeMfBodiesAsync(zip, (d) => new Promise((res, rej) => inflateRaw(d, (e, out) => (e ? rej(e) : res(out)))), sync),
    ).toEqual(byFflate);
    // APPNOTE §4.3.12: the uncompressed size at offset 24 of the model's central directory header.
    const lying = zip.slice();
    const v = new DataView(lying.buffer);
    const name = strToU8("3D/3dmodel.model");
    for (let at = 0; at < lying.length - 46; at++) {
      if (v.getUint32(at, true) !== 0x02014b50 || v.getUint16(at + 28, true) !== name.length) continue;
      if (lying.subarray(at + 46, at + 46 + name.length).every((c, k) => c === name[k]))
        v.setUint32(at + 24, v.getUint32(at + 24, true) + 1, true);
    }
    expect(() => readThreeMfBodies(lying, sync)).toThrow(ThreeMfProofError);
    expect(() => readThreeMfBodies(lying, sync)).toThrow(/expands to \d+ bytes where the directory says \d+/);
  });
});
