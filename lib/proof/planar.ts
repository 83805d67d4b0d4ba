import type { MultiPolygon, Ring } from "polygon-clipping";

/** 2D helpers of the proof: convex overlap, hulls, a triangle grid, boundary loops, areas. */

export type Box2 = { minX: number; minY: number; maxX: number; maxY: number };

export function boxOf(xy: ArrayLike<number>): Box2 {
  let minX = Infinity,
    minY = Infinity,
    maxX = -Infinity,
    maxY = -Infinity;
  for (let i = 0; i < xy.length; i += 2) {
    const x = xy[i]!,
      y = xy[i + 1]!;
    if (x < minX) minX = x;
    if (x > maxX) maxX = x;
    if (y < minY) minY = y;
    if (y > maxY) maxY = y;
  }
  return { minX, minY, maxX, maxY };
}

export const boxesOverlap = (a: Box2, b: Box2, eps = 0) =>
  a.minX < b.maxX - eps && b.minX < a.maxX - eps && a.minY < b.maxY - eps && b.minY < a.maxY - eps;

/**
 * Do two convex polygons (flat x, y lists, either winding) overlap by more than `eps` (mm)?
 * Separating-axis test: they are apart when their shadows on some edge normal overlap by `eps` or less,
 * so polygons that only touch along an edge or at a corner do not count.
 */
export function convexOverlap(a: ArrayLike<number>, b: ArrayLike<number>, eps: number): boolean {
  return !separatedOnEdgesOf(a, a, b, eps) && !separatedOnEdgesOf(b, a, b, eps);
}

function separatedOnEdgesOf(p: ArrayLike<number>, a: ArrayLike<number>, b: ArrayLike<number>, eps: number): boolean {
  const n = p.length;
  for (let i = 0; i < n; i += 2) {
    const j = (i + 2) % n;
    let nx = -(p[j + 1]! - p[i + 1]!),
      ny = p[j]! - p[i]!;
    const len = Math.hypot(nx, ny);
    if (len < 1e-12) continue;
    nx /= len;
    ny /= len;
    let aMin = Infinity,
      aMax = -Infinity,
      bMin = Infinity,
      bMax = -Infinity;
    for (let k = 0; k < a.length; k += 2) {
      const d = a[k]! * nx + a[k + 1]! * ny;
      if (d < aMin) aMin = d;
      if (d > aMax) aMax = d;
    }
    for (let k = 0; k < b.length; k += 2) {
      const d = b[k]! * nx + b[k + 1]! * ny;
      if (d < bMin) bMin = d;
      if (d > bMax) bMax = d;
    }
    if (aMax <= bMin + eps || bMax <= aMin + eps) return true;
  }
  return false;
}

/**
 * A convex polygon (flat x, y, as `convexHull` gives it) with its edge normals and its own shadow
 * on each, worked out once: the separating-axis test against it then costs O(n) instead of O(n²).
 * `overlaps(poly, eps)` is `convexOverlap(poly, this polygon, eps)`.
 */
export class ConvexShape {
  /** Per edge with a length: nx, ny, min and max of the polygon's own projection. */
  private readonly axes: Float64Array;
  constructor(readonly xy: Float64Array) {
    const n = xy.length;
    const axes: number[] = [];
    // The extremes on successive edge normals turn with the edges: each is walked on from the last
    // (rotating calipers), so the whole table costs O(n), not O(n²).
    let lo = -1,
      hi = -1;
    const proj = (k: number, nx: number, ny: number) => xy[k]! * nx + xy[k + 1]! * ny;
    for (let i = 0; i < n; i += 2) {
      const j = (i + 2) % n;
      let nx = -(xy[j + 1]! - xy[i + 1]!),
        ny = xy[j]! - xy[i]!;
      const len = Math.hypot(nx, ny);
      if (len < 1e-12) continue;
      nx /= len;
      ny /= len;
      if (lo < 0) {
        lo = hi = 0;
        for (let k = 2; k < n; k += 2) {
          if (proj(k, nx, ny) < proj(lo, nx, ny)) lo = k;
          if (proj(k, nx, ny) > proj(hi, nx, ny)) hi = k;
        }
      } else {
        for (let s = 0; s < n && proj((lo + 2) % n, nx, ny) <= proj(lo, nx, ny); s += 2) lo = (lo + 2) % n;
        for (let s = 0; s < n && proj((hi + 2) % n, nx, ny) >= proj(hi, nx, ny); s += 2) hi = (hi + 2) % n;
      }
      axes.push(nx, ny, proj(lo, nx, ny), proj(hi, nx, ny));
    }
    this.axes = Float64Array.from(axes);
  }
  overlaps(poly: ArrayLike<number>, eps: number): boolean {
    // The polygon's own edges first (as convexOverlap does), against this shape's points.
    if (separatedOnEdgesOf(poly, poly, this.xy, eps)) return false;
    const ax = this.axes;
    for (let i = 0; i < ax.length; i += 4) {
      const nx = ax[i]!,
        ny = ax[i + 1]!;
      let aMin = Infinity,
        aMax = -Infinity;
      for (let k = 0; k < poly.length; k += 2) {
        const d = poly[k]! * nx + poly[k + 1]! * ny;
        if (d < aMin) aMin = d;
        if (d > aMax) aMax = d;
      }
      if (aMax <= ax[i + 2]! + eps || ax[i + 3]! <= aMin + eps) return false;
    }
    return true;
  }
}

/**
 * Convex hull of points (flat x, y), counter-clockwise, by the monotone chain. Points inside the
 * octagon of the extreme points are dropped first (Akl–Toussaint), which leaves few to sort.
 */
export function convexHull(xy: ArrayLike<number>): Float64Array {
  const n = xy.length / 2;
  if (n === 0) return new Float64Array(0);
  // The eight extremes: min/max of x, y, x + y, x − y (the first point reaching each).
  let e0 = 0,
    e1 = 0,
    e2 = 0,
    e3 = 0,
    e4 = 0,
    e5 = 0,
    e6 = 0,
    e7 = 0;
  let b0 = -Infinity,
    b1 = -Infinity,
    b2 = -Infinity,
    b3 = -Infinity,
    b4 = -Infinity,
    b5 = -Infinity,
    b6 = -Infinity,
    b7 = -Infinity;
  for (let i = 0; i < n; i++) {
    const x = xy[2 * i]!,
      y = xy[2 * i + 1]!;
    if (-x > b0) {
      b0 = -x;
      e0 = i;
    }
    if (x > b1) {
      b1 = x;
      e1 = i;
    }
    if (-y > b2) {
      b2 = -y;
      e2 = i;
    }
    if (y > b3) {
      b3 = y;
      e3 = i;
    }
    if (x + y > b4) {
      b4 = x + y;
      e4 = i;
    }
    if (-x - y > b5) {
      b5 = -x - y;
      e5 = i;
    }
    if (x - y > b6) {
      b6 = x - y;
      e6 = i;
    }
    if (y - x > b7) {
      b7 = y - x;
      e7 = i;
    }
  }
  // Octagon in counter-clockwise order: left, bottom-left, bottom, bottom-right, right, top-right, top, top-left.
  const ring = [e0, e5, e2, e6, e1, e4, e3, e7];
  const oct: number[] = [];
  for (const i of ring) {
    const x = xy[2 * i]!,
      y = xy[2 * i + 1]!;
    const l = oct.length;
    if (l >= 2 && oct[l - 2] === x && oct[l - 1] === y) continue;
    oct.push(x, y);
  }
  if (oct.length >= 4 && oct[0] === oct[oct.length - 2] && oct[1] === oct[oct.length - 1]) oct.length -= 2;
  // Its edges as start point and direction.
  const m = oct.length;
  const edge = new Float64Array(2 * m);
  for (let k = 0; k < m; k += 2) {
    edge[2 * k] = oct[k]!;
    edge[2 * k + 1] = oct[k + 1]!;
    edge[2 * k + 2] = oct[(k + 2) % m]! - oct[k]!;
    edge[2 * k + 3] = oct[(k + 3) % m]! - oct[k + 1]!;
  }
  const kept = new Uint32Array(n);
  let nk = 0;
  for (let i = 0; i < n; i++) {
    const x = xy[2 * i]!,
      y = xy[2 * i + 1]!;
    let inside = m >= 6;
    for (let k = 0; inside && k < 2 * m; k += 4) {
      if (edge[k + 2]! * (y - edge[k + 1]!) - edge[k + 3]! * (x - edge[k]!) <= 0) inside = false;
    }
    if (!inside) kept[nk++] = i;
  }
  const keep = kept.subarray(0, nk).sort((i, j) => xy[2 * i]! - xy[2 * j]! || xy[2 * i + 1]! - xy[2 * j + 1]!);
  // Monotone chain: the lower hull left to right, then the upper right to left.
  const hx = new Float64Array(2 * nk + 2),
    hy = new Float64Array(2 * nk + 2);
  let h = 0;
  const chain = (from: number, to: number, step: number, floor: number) => {
    for (let k = from; k !== to; k += step) {
      const i = keep[k]!;
      const x = xy[2 * i]!,
        y = xy[2 * i + 1]!;
      while (h >= floor + 2 && (hx[h - 1]! - hx[h - 2]!) * (y - hy[h - 2]!) - (hy[h - 1]! - hy[h - 2]!) * (x - hx[h - 2]!) <= 0) h--;
      hx[h] = x;
      hy[h] = y;
      h++;
    }
  };
  chain(0, nk, 1, 0);
  if (nk > 1) chain(nk - 2, -1, -1, h - 1);
  h--;
  const out = new Float64Array(2 * Math.max(0, h));
  for (let k = 0; k < h; k++) {
    out[2 * k] = hx[k]!;
    out[2 * k + 1] = hy[k]!;
  }
  return out;
}

/** The edges of a convex ring as outward half-planes: nx·x + ny·y − c is the distance outside. */
export function halfPlanes(r: Ring): Float64Array {
  const ccw = ringArea(r) > 0 ? 1 : -1;
  const out: number[] = [];
  for (let i = 0; i < r.length; i++) {
    const a = r[i]!,
      b = r[(i + 1) % r.length]!;
    const ex = b[0] - a[0],
      ey = b[1] - a[1];
    const len = Math.hypot(ex, ey);
    if (len < 1e-12) continue;
    const nx = (ccw * ey) / len,
      ny = (-ccw * ex) / len;
    out.push(nx, ny, nx * a[0] + ny * a[1]);
  }
  return Float64Array.from(out);
}

/** How far the farthest of the points (flat x, y) lies outside the half-planes (≤ 0: all inside). */
export function outsideBy(planes: Float64Array, xy: ArrayLike<number>): number {
  let worst = -Infinity;
  for (let k = 0; k < xy.length; k += 2) {
    const x = xy[k]!,
      y = xy[k + 1]!;
    for (let p = 0; p < planes.length; p += 3) {
      const d = planes[p]! * x + planes[p + 1]! * y - planes[p + 2]!;
      if (d > worst) worst = d;
    }
  }
  return worst;
}

/**
 * Triangles (flat: 6 numbers each) bucketed on a uniform grid (cells in one typed array, filled by a
 * counting sort), asked whether any of them overlaps a convex polygon by more than `eps`. The grid is
 * built at the first query that would scan many triangles: a set asked once or twice (a piece's flat
 * bottom under the slab face it stands over) is scanned by boxes instead.
 */
export class TriGrid {
  private readonly box: Box2;
  /** Each triangle's box: min x, min y, max x, max y. */
  private readonly boxes: Float64Array;
  private grid: { cell: number; cols: number; rows: number; start: Uint32Array; items: Uint32Array; mark: Uint32Array } | null = null;
  private stamp = 0;
  private scanned = 0;
  constructor(readonly tri: Float64Array) {
    const n = tri.length / 6;
    this.box = boxOf(tri);
    this.boxes = new Float64Array(4 * n);
    for (let t = 0; t < n; t++) {
      const o = 6 * t;
      this.boxes[4 * t] = Math.min(tri[o]!, tri[o + 2]!, tri[o + 4]!);
      this.boxes[4 * t + 1] = Math.min(tri[o + 1]!, tri[o + 3]!, tri[o + 5]!);
      this.boxes[4 * t + 2] = Math.max(tri[o]!, tri[o + 2]!, tri[o + 4]!);
      this.boxes[4 * t + 3] = Math.max(tri[o + 1]!, tri[o + 3]!, tri[o + 5]!);
    }
  }
  private build() {
    const n = this.tri.length / 6;
    const w = this.box.maxX - this.box.minX || 1,
      h = this.box.maxY - this.box.minY || 1;
    let cell = Math.max(Math.sqrt((w * h) / Math.max(1, n)) * 2, 1e-3);
    const cols = Math.min(4096, Math.ceil(w / cell) + 1);
    const rows = Math.min(4096, Math.ceil(h / cell) + 1);
    cell = Math.max(w / (cols - 0.5), h / (rows - 0.5), cell);
    const g = { cell, cols, rows, start: new Uint32Array(cols * rows + 1), items: new Uint32Array(0), mark: new Uint32Array(n) };
    this.grid = g;
    const counts = g.start;
    const bx = this.boxes;
    for (let t = 0; t < n; t++) {
      const [c0, c1, r0, r1] = this.range(bx[4 * t]!, bx[4 * t + 1]!, bx[4 * t + 2]!, bx[4 * t + 3]!);
      for (let r = r0; r <= r1; r++) for (let c = c0; c <= c1; c++) counts[r * cols + c + 1]!++;
    }
    for (let k = 0; k < cols * rows; k++) counts[k + 1]! += counts[k]!;
    const fill = counts.slice();
    g.items = new Uint32Array(counts[cols * rows]!);
    for (let t = 0; t < n; t++) {
      const [c0, c1, r0, r1] = this.range(bx[4 * t]!, bx[4 * t + 1]!, bx[4 * t + 2]!, bx[4 * t + 3]!);
      for (let r = r0; r <= r1; r++) for (let c = c0; c <= c1; c++) g.items[fill[r * cols + c]!++] = t;
    }
  }
  private range(minX: number, minY: number, maxX: number, maxY: number): [number, number, number, number] {
    const g = this.grid!;
    const c0 = Math.max(0, Math.floor((minX - this.box.minX) / g.cell));
    const c1 = Math.min(g.cols - 1, Math.floor((maxX - this.box.minX) / g.cell));
    const r0 = Math.max(0, Math.floor((minY - this.box.minY) / g.cell));
    const r1 = Math.min(g.rows - 1, Math.floor((maxY - this.box.minY) / g.cell));
    return [c0, c1, r0, r1];
  }
  /** Any triangle overlapping the convex polygon `poly` (flat x, y) by more than eps. */
  overlaps(poly: ArrayLike<number>, eps: number): boolean {
    const b = boxOf(poly);
    if (!boxesOverlap(b, this.box, eps)) return false;
    const n = this.tri.length / 6;
    if (!this.grid && this.scanned + n > 16 * n && n > 64) this.build();
    const g = this.grid;
    if (!g) {
      // By boxes: a triangle whose box does not overlap the polygon's overlaps it by nothing along
      // some axis, so by no more than eps along the separating axis test's best one.
      this.scanned += n;
      const bx = this.boxes;
      for (let t = 0; t < n; t++) {
        if (bx[4 * t]! >= b.maxX || bx[4 * t + 2]! <= b.minX || bx[4 * t + 1]! >= b.maxY || bx[4 * t + 3]! <= b.minY) continue;
        if (convexOverlap(this.tri.subarray(6 * t, 6 * t + 6), poly, eps)) return true;
      }
      return false;
    }
    const [c0, c1, r0, r1] = this.range(b.minX, b.minY, b.maxX, b.maxY);
    const stamp = ++this.stamp;
    for (let r = r0; r <= r1; r++) {
      for (let c = c0; c <= c1; c++) {
        const k = r * g.cols + c;
        for (let i = g.start[k]!; i < g.start[k + 1]!; i++) {
          const t = g.items[i]!;
          if (g.mark[t] === stamp) continue;
          g.mark[t] = stamp;
          if (convexOverlap(this.tri.subarray(6 * t, 6 * t + 6), poly, eps)) return true;
        }
      }
    }
    return false;
  }
}

/**
 * Do all points (flat x, y) lie within `tol` of the inside of the half-planes (as
 * `outsideBy(planes, xy) <= tol`)? A plane the points' bounding circle stays clear of is not scanned.
 */
export function withinPlanes(planes: Float64Array, xy: ArrayLike<number>, tol: number): boolean {
  const b = boxOf(xy);
  const cx = (b.minX + b.maxX) / 2,
    cy = (b.minY + b.maxY) / 2;
  const r = Math.hypot(b.maxX - b.minX, b.maxY - b.minY) / 2;
  for (let p = 0; p < planes.length; p += 3) {
    const nx = planes[p]!,
      ny = planes[p + 1]!,
      c = planes[p + 2]!;
    if (nx * cx + ny * cy - c + r < tol - 1e-9) continue;
    for (let k = 0; k < xy.length; k += 2) if (nx * xy[k]! + ny * xy[k + 1]! - c > tol) return false;
  }
  return true;
}

/**
 * The boundary of a set of triangles seen from above, as closed loops: every directed edge whose
 * reverse is not in the set. Interior edges cancel. Loops come out in any winding; read them with
 * an even-odd rule (see `evenOdd`).
 */
export function boundaryLoops(
  tris: ArrayLike<number>,
  positions: Float32Array,
  cornersOf: (t: number) => [number, number, number],
): Ring[] {
  const nv = positions.length / 3;
  const key = (a: number, b: number) => a * nv + b;
  const edges = new Set<number>();
  for (let i = 0; i < tris.length; i++) {
    const [a, b, c] = cornersOf(tris[i]!);
    for (let e = 0; e < 3; e++) {
      const u = e === 0 ? a : e === 1 ? b : c,
        v = e === 0 ? b : e === 1 ? c : a;
      const back = key(v, u);
      if (edges.has(back)) edges.delete(back);
      else edges.add(key(u, v));
    }
  }
  const next = new Map<number, number[]>();
  for (const e of edges) {
    const u = Math.floor(e / nv),
      v = e - u * nv;
    const list = next.get(u);
    if (list) list.push(v);
    else next.set(u, [v]);
  }
  const loops: Ring[] = [];
  for (const start of [...next.keys()]) {
    for (;;) {
      const outs = next.get(start);
      if (!outs || outs.length === 0) break;
      const ring: Ring = [];
      let u = start;
      for (let guard = 0; guard <= edges.size; guard++) {
        ring.push([positions[3 * u]!, positions[3 * u + 1]!]);
        const list = next.get(u);
        const v = list?.pop();
        if (v === undefined) break;
        u = v;
        if (u === start) break;
      }
      if (ring.length >= 3) loops.push(ring);
    }
  }
  return loops;
}

export function ringArea(r: Ring): number {
  let s = 0;
  for (let i = 0, j = r.length - 1; i < r.length; j = i++) s += (r[j]![0] - r[i]![0]) * (r[j]![1] + r[i]![1]);
  return s / 2;
}

/** Area of a polygon-clipping result (outer rings counter-clockwise, holes clockwise). */
export function multiArea(mp: MultiPolygon): number {
  let s = 0;
  for (const poly of mp) for (const ring of poly) s += ringArea(ring);
  return Math.abs(s) < 1e-15 ? 0 : s;
}

export function multiPerimeter(mp: MultiPolygon): number {
  let s = 0;
  for (const poly of mp)
    for (const r of poly)
      for (let i = 0, j = r.length - 1; i < r.length; j = i++) s += Math.hypot(r[i]![0] - r[j]![0], r[i]![1] - r[j]![1]);
  return s;
}

/** Is the closed ring convex (collinear corners allowed)? */
export function isConvex(r: Ring): boolean {
  let sign = 0;
  for (let i = 0; i < r.length; i++) {
    const a = r[i]!,
      b = r[(i + 1) % r.length]!,
      c = r[(i + 2) % r.length]!;
    const z = (b[0] - a[0]) * (c[1] - b[1]) - (b[1] - a[1]) * (c[0] - b[0]);
    if (Math.abs(z) < 1e-9) continue;
    if (sign === 0) sign = Math.sign(z);
    else if (Math.sign(z) !== sign) return false;
  }
  return true;
}
