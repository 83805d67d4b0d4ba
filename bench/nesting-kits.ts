/**
 * The nesting benchmark's kits, fixed by code (our own shapes, no mesh files): hexagon tiles, discs,
 * the demo kit, gears with cubes and tetrahedra, bars with L-brackets, and a mixed kit too big for
 * one bed. Used by bench/nesting.ts and by the nesting tests.
 */
import { DEMO_PAWN_SEGMENTS, hexTile, loft, pawn, type Ring } from "../lib/geometry/demo-shapes";
import type { IndexedMesh } from "../lib/geometry/mesh";
import type { PlatePart } from "../lib/geometry/build-plate";
import type { SlabOptionsInput } from "../lib/geometry/options";

const circle = (r: number, n: number, phase = 0): [number, number][] =>
  Array.from({ length: n }, (_, i) => [r * Math.cos(phase + (2 * Math.PI * i) / n), r * Math.sin(phase + (2 * Math.PI * i) / n)]);

/** A prism through a ring that is star-shaped about its centroid, from z = 0 to `height`. */
const prism = (points: [number, number][], height: number): IndexedMesh => loft([0, height].map((z): Ring => ({ z, points })));

export function discToken(diameter = 25, height = 3, segments = 96): IndexedMesh {
  return prism(circle(diameter / 2, segments), height);
}

/** A spur gear's outline, `teeth` trapezoidal teeth between root and tip circles (tip diameter `diameter`). */
export function gear(diameter = 48, teeth = 18, height = 6): IndexedMesh {
  const tip = diameter / 2,
    root = tip - 4;
  const pts: [number, number][] = [];
  for (let t = 0; t < teeth; t++) {
    const a0 = (2 * Math.PI * t) / teeth,
      step = (2 * Math.PI) / teeth;
    const at = (f: number, r: number): [number, number] => [r * Math.cos(a0 + f * step), r * Math.sin(a0 + f * step)];
    pts.push(at(0, root), at(0.15, root), at(0.3, tip), at(0.55, tip), at(0.7, root), at(0.85, root));
  }
  return prism(pts, height);
}

export function cube(side = 10): IndexedMesh {
  const s = side / 2;
  return prism(
    [
      [-s, -s],
      [s, -s],
      [s, s],
      [-s, s],
    ],
    side,
  );
}

export function tetrahedron(edge = 20): IndexedMesh {
  const r = edge / Math.sqrt(3),
    h = edge * Math.sqrt(2 / 3);
  const base = circle(r, 3, Math.PI / 2);
  const v = [...base.flatMap(([x, y]) => [x, y, 0]), 0, 0, h];
  return { vertProperties: new Float32Array(v), triVerts: new Uint32Array([0, 2, 1, 0, 1, 3, 1, 2, 3, 2, 0, 3]) };
}

export function bar(length = 80, width = 8, height = 4): IndexedMesh {
  return prism(
    [
      [-length / 2, -width / 2],
      [length / 2, -width / 2],
      [length / 2, width / 2],
      [-length / 2, width / 2],
    ],
    height,
  );
}

/** An L-bracket: two 50 × 10 mm arms at a right angle, 4 mm tall (an L is not star-shaped about its centroid, so built by hand). */
export function lBracket(arm = 50, width = 10, height = 4): IndexedMesh {
  const verts: number[] = [];
  const tris: number[] = [];
  // One closed solid: the L's outline extruded, its caps split into the two rectangles' quads.
  const ring: [number, number][] = [
    [0, 0],
    [arm, 0],
    [arm, width],
    [width, width],
    [width, arm],
    [0, arm],
  ];
  const n = ring.length;
  for (const z of [0, height]) for (const [x, y] of ring) verts.push(x, y, z);
  for (let j = 0; j < n; j++) {
    const a = j,
      b = (j + 1) % n;
    tris.push(a, b, n + b, a, n + b, n + a);
  }
  // Caps: the quads (0,1,2,3) and (0,3,4,5) of the outline, seen from below (bottom) and above (top).
  for (const [a, b, c, d] of [
    [0, 1, 2, 3],
    [0, 3, 4, 5],
  ] as [number, number, number, number][]) {
    tris.push(a, c, b, a, d, c);
    tris.push(n + a, n + b, n + c, n + a, n + c, n + d);
  }
  return { vertProperties: new Float32Array(verts), triVerts: new Uint32Array(tris) };
}

const part = (id: string, name: string, mesh: IndexedMesh, quantity: number): PlatePart => ({ id, name, mesh, quantity });

export type NestKit = { id: string; title: string; parts: PlatePart[]; options: SlabOptionsInput };

const plain: SlabOptionsInput = { marks: { numbers: true, outlines: "ring" } };

export function nestKits(): NestKit[] {
  return [
    {
      id: "a",
      title: "24 hexagon tiles, 30 mm across flats",
      parts: [part("hex", "Hex tile", hexTile(30, 4), 24)],
      options: { ...plain, layout: { spacing: 1 }, marks: { numbers: false, outlines: "none" }, slab: { margin: 2, cornerRadius: 3 } },
    },
    {
      id: "b",
      title: "19 discs, 25 mm",
      parts: [part("disc", "Disc token", discToken(25), 19)],
      options: { layout: { spacing: 1 }, marks: { numbers: false, outlines: "none" }, slab: { margin: 2, cornerRadius: 3 } },
    },
    {
      id: "c",
      title: "the demo kit (4 harbour tiles, 2 beacon pawns)",
      parts: [part("tile", "Harbour tile", hexTile(), 4), part("pawn", "Beacon pawn", pawn(DEMO_PAWN_SEGMENTS / 8), 2)],
      options: {
        marks: { text: [{ value: "ORDER 10482" }], qr: { value: "https://example.com/o/10482" }, numbers: true, outlines: "ring" },
      },
    },
    {
      id: "d",
      title: "6 gears 48 mm, 4 cubes 10 mm, 3 tetrahedra",
      parts: [part("gear", "Gear", gear(48), 6), part("cube", "Cube", cube(10), 4), part("tet", "Tetrahedron", tetrahedron(20), 3)],
      options: plain,
    },
    {
      id: "e",
      title: "12 bars 80 × 8 mm, 6 L-brackets",
      parts: [part("bar", "Bar", bar(80, 8), 12), part("l", "L-bracket", lBracket(40, 8), 6)],
      options: plain,
    },
  ];
}

/** Kit (f): 40 mixed pieces on a 180 × 180 bed, more than one plate holds. */
export function mixedKit(): NestKit {
  return {
    id: "f",
    title: "40 mixed pieces on a 180 × 180 bed",
    parts: [
      part("gear", "Gear", gear(48), 8),
      part("hex", "Hex tile", hexTile(30, 4), 12),
      part("disc", "Disc token", discToken(25), 10),
      part("bar", "Bar", bar(80, 8), 6),
      part("l", "L-bracket", lBracket(), 4),
    ],
    options: { ...plain, layout: { bed: { width: 180, depth: 180 } } },
  };
}
