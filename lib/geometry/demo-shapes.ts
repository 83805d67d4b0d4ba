import type { IndexedMesh } from "./mesh";

/** A closed ring of points (counter-clockwise seen from +z) at one height. */
export type Ring = { z: number; points: [number, number][] };

/**
 * A closed solid through stacked rings of equal point count, capped at both ends by a fan from the
 * ring's centroid. Used for the demo parts the seed generates (no mesh file is shipped for them).
 */
export function loft(rings: Ring[]): IndexedMesh {
  if (rings.length < 2) throw new Error("loft needs at least two rings");
  const n = rings[0]!.points.length;
  if (n < 3 || rings.some((r) => r.points.length !== n)) throw new Error("loft rings need the same count of ≥ 3 points");
  const verts: number[] = [];
  for (const r of rings) for (const [x, y] of r.points) verts.push(x, y, r.z);
  const centroid = (r: Ring) => {
    let cx = 0,
      cy = 0;
    for (const [x, y] of r.points) {
      cx += x;
      cy += y;
    }
    return [cx / n, cy / n] as const;
  };
  const first = rings[0]!;
  const last = rings[rings.length - 1]!;
  const bottom = verts.length / 3;
  const [bx, by] = centroid(first);
  verts.push(bx, by, first.z);
  const top = verts.length / 3;
  const [tx, ty] = centroid(last);
  verts.push(tx, ty, last.z);

  const tris: number[] = [];
  const at = (ring: number, j: number) => ring * n + (j % n);
  for (let j = 0; j < n; j++) tris.push(bottom, at(0, j + 1), at(0, j));
  for (let i = 0; i + 1 < rings.length; i++) {
    for (let j = 0; j < n; j++) {
      tris.push(at(i, j), at(i + 1, j + 1), at(i + 1, j));
      tris.push(at(i, j), at(i, j + 1), at(i + 1, j + 1));
    }
  }
  const k = rings.length - 1;
  for (let j = 0; j < n; j++) tris.push(at(k, j), at(k, j + 1), top);
  return { vertProperties: new Float32Array(verts), triVerts: new Uint32Array(tris) };
}

function regularPolygon(sides: number, circumradius: number, phase = 0): [number, number][] {
  const pts: [number, number][] = [];
  for (let i = 0; i < sides; i++) {
    const a = phase + (2 * Math.PI * i) / sides;
    pts.push([circumradius * Math.cos(a), circumradius * Math.sin(a)]);
  }
  return pts;
}

/**
 * A hexagonal game tile: `across` mm across flats, `height` mm tall, with a 45° chamfer of `chamfer` mm
 * on the bottom edge (keeps the first layer's elephant foot off the outline) and on the top edge.
 */
export function hexTile(across = 30, height = 4, chamfer = 0.4): IndexedMesh {
  const r = across / 2 / Math.cos(Math.PI / 6);
  const inset = chamfer / Math.cos(Math.PI / 6);
  const ring = (z: number, cr: number): Ring => ({ z, points: regularPolygon(6, cr, Math.PI / 6) });
  return loft([ring(0, r - inset), ring(chamfer, r), ring(height - chamfer, r), ring(height, r - inset)]);
}

/** Segments of the seeded demo pawn (≈24k triangles each, so the demo kit is ≈48k on a plate). */
export const DEMO_PAWN_SEGMENTS = 800;

/** A turned pawn: base, waist, collar and a domed head, revolved from a radius profile. */
export function pawn(segments = 48): IndexedMesh {
  const profile: [number, number][] = [
    [0, 7],
    [0.4, 7.4],
    [2.5, 7.4],
    [3.2, 6.2],
    [4.5, 4.2],
    [6.5, 4],
    [9.5, 3.6],
    [10.5, 5],
    [11.5, 3.4],
    [13, 3.6],
    [15, 4.3],
    [17, 4.2],
    [18.5, 3.2],
    [19.3, 1.8],
    [19.6, 0.6],
  ]; // [z, radius] in mm, from the bottom up
  const rings: Ring[] = profile.map(([z, radius]) => ({ z, points: regularPolygon(segments, radius) }));
  return loft(rings);
}
