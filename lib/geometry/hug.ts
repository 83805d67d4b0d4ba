import { convexHullOf, turned, type Convex, type Pt } from "./nest";

/**
 * Shapes grown round pieces for the nest and for their numbers: a convex set grown by a distance
 * as a polygon that holds it, and the room beside a piece's ring where its number goes.
 */

/**
 * The polygon round a convex set grown by `grow`: the half-planes tangent to it in the hull's own
 * edge directions and in `uniform` directions evenly round the circle (so round offsets stay a
 * few dozen points). It holds the grown set by construction (each half-plane does).
 */
export function grownHull(hull: Pt[], grow: number, uniform = 16): Convex {
  const h = convexHullOf(hull);
  const g = Math.max(grow, 1e-3);
  const dirs: number[] = [];
  if (h.length <= 24) {
    for (let i = 0; i < h.length; i++) {
      const a = h[i]!,
        b = h[(i + 1) % h.length]!;
      dirs.push(Math.atan2(-(b[0] - a[0]), b[1] - a[1]));
    }
  }
  const k = h.length <= 24 ? uniform : 20;
  for (let i = 0; i < k; i++) dirs.push(-Math.PI + ((i + 0.5) * 2 * Math.PI) / k);
  const sorted = dirs.map((d) => Math.atan2(Math.sin(d), Math.cos(d))).sort((a, b) => a - b);
  const ds = sorted.filter((d, i) => i === 0 || d - sorted[i - 1]! > 1e-7);
  if (ds.length > 1 && ds[0]! + 2 * Math.PI - ds[ds.length - 1]! <= 1e-7) ds.pop();
  const lines = ds.map((d) => {
    const nx = Math.cos(d),
      ny = Math.sin(d);
    let s = -Infinity;
    for (const [x, y] of h) s = Math.max(s, nx * x + ny * y);
    return { nx, ny, c: s + g };
  });
  const out: Pt[] = [];
  for (let i = 0; i < lines.length; i++) {
    const a = lines[i]!,
      b = lines[(i + 1) % lines.length]!;
    const det = a.nx * b.ny - a.ny * b.nx;
    if (Math.abs(det) < 1e-12) continue;
    out.push([(a.c * b.ny - a.ny * b.c) / det, (a.nx * b.c - a.c * b.nx) / det]);
  }
  return convexHullOf(out);
}

/** The least x of a convex polygon within the strip y0 ≤ y ≤ y1 (Infinity if it misses the strip). */
export function leftmostIn(poly: Pt[], y0: number, y1: number): number {
  let best = Infinity;
  for (let i = 0; i < poly.length; i++) {
    const a = poly[i]!,
      b = poly[(i + 1) % poly.length]!;
    for (const [p, q] of [
      [a, b],
      [b, a],
    ] as [Pt, Pt][]) {
      if (p[1] >= y0 - 1e-9 && p[1] <= y1 + 1e-9) best = Math.min(best, p[0]);
      for (const yy of [y0, y1]) {
        if ((p[1] - yy) * (q[1] - yy) < 0) best = Math.min(best, p[0] + ((yy - p[1]) / (q[1] - p[1])) * (q[0] - p[0]));
      }
    }
  }
  return best;
}

/** Sides of the ring a number may take: beside it at its top, left or right, or at its bottom, left or right. */
export const NUMBER_SIDES = 2;

/**
 * Where a piece's number goes, from the ring's hull where the piece stands (turned, moved): a row as
 * tall as a number at the top of the ring (side 0, 1) or at its bottom (2, 3), and in it the room
 * `width` wide one gap left (0, 2) or right (1, 3) of the ring. A piece lower than the row has the row
 * over its whole height. The number hugs the piece.
 */
export function numberSpot(
  ringHull: Pt[],
  numberRow: number,
  gap: number,
  width: number,
  side = 0,
): { minX: number; rowBottom: number; rowTop: number } {
  let minY = Infinity,
    maxY = -Infinity;
  for (const [, y] of ringHull) {
    minY = Math.min(minY, y);
    maxY = Math.max(maxY, y);
  }
  const atTop = side < 2;
  const rowTop = atTop ? Math.max(maxY, minY + numberRow) : Math.min(maxY, minY + numberRow);
  const rowBottom = rowTop - numberRow;
  if (side % 2 === 0) {
    const left = leftmostIn(ringHull, rowBottom, rowTop);
    const x = Number.isFinite(left) ? left : Math.min(...ringHull.map((p) => p[0]));
    return { minX: x - gap - width, rowBottom, rowTop };
  }
  const right = -leftmostIn(
    ringHull.map(([x, y]): Pt => [-x, y]),
    rowBottom,
    rowTop,
  );
  const x = Number.isFinite(right) ? right : Math.max(...ringHull.map((p) => p[0]));
  return { minX: x + gap, rowBottom, rowTop };
}

/** The ring's hull of a piece at its turn, about its reference point. */
export function ringHullAt(hull: Pt[], angle: number, ext: number): Convex {
  return grownHull(turned(hull, angle), ext);
}
