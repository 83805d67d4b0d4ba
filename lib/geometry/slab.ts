import type { CrossSection } from "manifold-3d";
import type { Kernel, Scope } from "./kernel";
import type { Contour } from "./marks/text";
import { areaScore } from "./layout";
import type { SlabOptions } from "./options";
import type { SlabShapeId } from "./slab-shapes";

export type { SlabShapeId as SlabShape } from "./slab-shapes";
type Box = { minX: number; minY: number; maxX: number; maxY: number };

/** A point the slab must hold with `clearance` + the margin all round it (a piece's hull vertex: its ring). */
export type ContentPoint = { x: number; y: number; clearance: number };

/**
 * Whether the rounded rectangle over `b` with corner radius `r` (clamped as roundedRect clamps it)
 * holds every point with its clearance + `m` all round. The rectangle is convex, so a disc of radius c
 * round p lies inside it exactly when p lies inside the rectangle shrunk by c on every side and, where
 * r > c, within r − c of the rectangle's core (the rectangle shrunk by r).
 */
function holds(b: Box, r: number, m: number, points: ContentPoint[]): boolean {
  const w = b.maxX - b.minX,
    h = b.maxY - b.minY;
  const rr = Math.max(0, Math.min(r, w / 2, h / 2));
  const eps = 1e-7;
  for (const p of points) {
    const c = p.clearance + m;
    if (p.x < b.minX + c - eps || p.x > b.maxX - c + eps || p.y < b.minY + c - eps || p.y > b.maxY - c + eps) return false;
    if (rr <= c) continue;
    const dx = Math.max(b.minX + rr - p.x, 0, p.x - (b.maxX - rr));
    const dy = Math.max(b.minY + rr - p.y, 0, p.y - (b.maxY - rr));
    if (Math.hypot(dx, dy) > rr - c + eps) return false;
  }
  return true;
}

const grow = (b: Box, e: number): Box => ({ minX: b.minX - e, minY: b.minY - e, maxX: b.maxX + e, maxY: b.maxY + e });

/** The smallest x in [0, hi] for which ok(x) holds, ok being monotone and ok(hi) true (bisection to 1 µm). */
function least(hi: number, ok: (x: number) => boolean): number {
  if (ok(0)) return 0;
  let lo = 0;
  while (hi - lo > 1e-3) {
    const mid = (lo + hi) / 2;
    if (ok(mid)) hi = mid;
    else lo = mid;
  }
  return hi;
}

/**
 * What became of round corners that would cut into the content: the slab grown evenly by `grownBy`
 * on every side to `size` (`largestFitting` is the radius that would have kept it at its smallest),
 * or, where that slab (`grownSize`) would leave the bed, the radius limited to `radius`. A finding
 * says which (build-checks.ts).
 */
export type CornerFit =
  | { kind: "grown"; asked: number; grownBy: number; size: [number, number]; largestFitting: number }
  | { kind: "limited"; asked: number; radius: number; grownSize: [number, number] };

/**
 * A rounded rectangle that holds every piece (with its ring), number and band with the margin, by
 * construction. Round corners cut into the content's box: the slab grows evenly just enough for the
 * asked radius; if that would leave the bed, the radius is limited instead.
 */
export function roundedSlab(o: SlabOptions, b: Box, points: ContentPoint[]): { box: Box; radius: number; corners?: CornerFit } {
  const m = o.slab.margin;
  const r = o.slab.cornerRadius;
  const tight = grow(b, m);
  if (holds(tight, r, m, points)) return { box: tight, radius: r };
  // Grown by r on every side the corners can no longer reach the content (its box is the core).
  const e = least(r, (x) => holds(grow(tight, x), r, m, points));
  const box = grow(tight, e);
  const bed = o.layout.bed;
  const size: [number, number] = [box.maxX - box.minX, box.maxY - box.minY];
  if (size[0] <= bed.width + 1e-6 && size[1] <= bed.depth + 1e-6) {
    // A few tenths of a millimetre (the margin kept round a mark's corner) go unsaid.
    if (e < 0.5) return { box, radius: r };
    return { box, radius: r, corners: { kind: "grown", asked: r, grownBy: e, size, largestFitting: maxRadius(tight, m, points) } };
  }
  const fit = maxRadius(tight, m, points);
  return { box: tight, radius: fit, corners: { kind: "limited", asked: r, radius: fit, grownSize: size } };
}

/** The largest corner radius the tight box allows with every point held (bisection; 0 always works). */
function maxRadius(tight: Box, m: number, points: ContentPoint[]): number {
  const top = Math.min(tight.maxX - tight.minX, tight.maxY - tight.minY) / 2;
  if (holds(tight, top, m, points)) return top;
  let lo = 0,
    hi = top;
  while (hi - lo > 1e-3) {
    const mid = (lo + hi) / 2;
    if (holds(tight, mid, m, points)) lo = mid;
    else hi = mid;
  }
  return lo;
}

/** Segments per quarter circle for slab corners: area error −1.6·10⁻⁴·r² per corner, far below a layer. */
export const CORNER_SEGMENTS = 32;
export const DISC_SEGMENTS = 256;

/** A rectangle with rounded corners, counter-clockwise, corners sampled with `perQuarter` segments. */
export function roundedRect(x0: number, y0: number, w: number, h: number, r: number, perQuarter = CORNER_SEGMENTS): Contour {
  const rr = Math.max(0, Math.min(r, w / 2, h / 2));
  if (rr === 0)
    return [
      [x0, y0],
      [x0 + w, y0],
      [x0 + w, y0 + h],
      [x0, y0 + h],
    ];
  const pts: Contour = [];
  const corners: [number, number, number][] = [
    [x0 + w - rr, y0 + rr, -90],
    [x0 + w - rr, y0 + h - rr, 0],
    [x0 + rr, y0 + h - rr, 90],
    [x0 + rr, y0 + rr, 180],
  ];
  for (const [cx, cy, start] of corners) {
    for (let i = 0; i <= perQuarter; i++) {
      const a = ((start + (90 * i) / perQuarter) * Math.PI) / 180;
      pts.push([cx + rr * Math.cos(a), cy + rr * Math.sin(a)]);
    }
  }
  // Where the radius is half a side, two arcs meet with no straight between them: their end points
  // are one point (kept twice, they land on one float32 corner in the file and fold a triangle).
  const near = (p: [number, number], q: [number, number]) => Math.abs(p[0] - q[0]) < 1e-6 && Math.abs(p[1] - q[1]) < 1e-6;
  const out = pts.filter((p, i) => i === 0 || !near(p, pts[i - 1]!));
  if (out.length > 1 && near(out[0]!, out[out.length - 1]!)) out.pop();
  return out;
}

export function disc(cx: number, cy: number, r: number, segments = DISC_SEGMENTS): Contour {
  const pts: Contour = [];
  for (let i = 0; i < segments; i++) {
    const a = (2 * Math.PI * i) / segments;
    pts.push([cx + r * Math.cos(a), cy + r * Math.sin(a)]);
  }
  return pts;
}

/** What the slab is built around: the content's boxes and points, the pieces' shadows and how far rings reach past them. */
export type SlabContent = {
  /** Everything's boxes: the slab's rectangle holds them. */
  boxes: Box[];
  /** Boxes a contour outline draws round as they are (numbers and marks; by boxes, the pieces' too). */
  rects: Box[];
  points: ContentPoint[];
  /** Points a disc must hold (the rings' hulls as polygons that hold them, the boxes' corners). */
  circlePoints: [number, number][];
  pieceShadows: CrossSection[];
  ext: number;
};
export type OutlineResult = { outline: CrossSection; corners?: CornerFit };

const boxOf = (boxes: Box[]) =>
  boxes.reduce(
    (acc, x) => ({
      minX: Math.min(acc.minX, x.minX),
      minY: Math.min(acc.minY, x.minY),
      maxX: Math.max(acc.maxX, x.maxX),
      maxY: Math.max(acc.maxY, x.maxY),
    }),
    { minX: Infinity, minY: Infinity, maxX: -Infinity, maxY: -Infinity },
  );

/** The smallest disc round the content (the rings' hulls, every box), with the margin. */
export function discOutline(kernel: Kernel, scope: Scope, o: SlabOptions, content: SlabContent): OutlineResult {
  const c = enclosingCircle(content.circlePoints);
  // Grow by the margin, and by the polygon's inset so the inscribed edges keep the full margin.
  const radius = (c.r + o.slab.margin) / Math.cos(Math.PI / DISC_SEGMENTS);
  return { outline: scope.track(new kernel.wasm.CrossSection([disc(c.x, c.y, radius)])) };
}

/** An outline that follows the pieces: their shadows grown by the margin, gaps between them closed, kept as one outline. */
export function contourOutline(kernel: Kernel, scope: Scope, o: SlabOptions, content: SlabContent): OutlineResult {
  const { CrossSection } = kernel.wasm;
  // 0.02 mm more than the margin: the round offsets' chords and the final simplification (0.01 mm)
  // may then shave the outline, never the content.
  const slack = o.slab.margin + 0.02;
  const grown = content.pieceShadows.map((s) => scope.track(s.offset(content.ext + slack, "Round", 2, 48)));
  const rects = content.rects.map(
    (x) =>
      [
        [x.minX - slack, x.minY - slack],
        [x.maxX + slack, x.minY - slack],
        [x.maxX + slack, x.maxY + slack],
        [x.minX - slack, x.maxY + slack],
      ] as Contour,
  );
  let cs = scope.track(CrossSection.union([...grown, ...rects.map((r) => scope.track(new CrossSection([r])))]));
  // Close the gaps between neighbours (grow, then shrink by the same amount).
  const close = Math.max(o.layout.spacing, 2) + o.slab.margin;
  cs = scope.track(scope.track(cs.offset(close, "Round", 2, 48)).offset(-close, "Round", 2, 48));
  const islands = cs.decompose().map((x) => scope.track(x));
  if (islands.length > 1) cs = scope.track(cs.hull());
  // No holes: where nested pieces leave a hollow wider than the closing reaches, the slab still
  // runs under it (a hole would weaken the slab and read as a cut through it).
  const outer = cs.toPolygons().filter((c) => ringArea(c) > 0);
  cs = scope.track(new CrossSection(outer, "Positive"));
  return { outline: scope.track(cs.simplify(0.01)) };
}

/** A rounded rectangle round the content, grown (or its radius limited) so every content point keeps the margin. */
export function roundedRectOutline(kernel: Kernel, scope: Scope, o: SlabOptions, content: SlabContent): OutlineResult {
  const r = roundedSlab(o, boxOf(content.boxes), content.points);
  const outline = scope.track(
    new kernel.wasm.CrossSection([roundedRect(r.box.minX, r.box.minY, r.box.maxX - r.box.minX, r.box.maxY - r.box.minY, r.radius)]),
  );
  return r.corners ? { outline, corners: r.corners } : { outline };
}

type ShapeRules = {
  outline: (kernel: Kernel, scope: Scope, o: SlabOptions, content: SlabContent) => OutlineResult;
  /**
   * How the packer rates a block of pieces with the mark bands, W × H mm (lower is better): the
   * slab's area for a rectangle, the circle round the block (its diagonal) for a disc.
   */
  packingScore: (width: number, height: number) => number;
  /** Text lines centred in their band (a disc stays small that way), else left-aligned. */
  centreText: boolean;
};

/** What each slab shape (slab-shapes.ts) does. */
export const SHAPE_RULES: Record<SlabShapeId, ShapeRules> = {
  "rounded-rect": { outline: roundedRectOutline, packingScore: areaScore, centreText: false },
  disc: { outline: discOutline, packingScore: (w, h) => Math.hypot(w, h), centreText: true },
  contour: { outline: contourOutline, packingScore: areaScore, centreText: false },
};

export type Circle = { x: number; y: number; r: number };

/**
 * The smallest circle holding every point (Welzl's algorithm in its iterative form, E. Welzl,
 * "Smallest enclosing disks", 1991). Points are visited in a fixed shuffled order so the result
 * never depends on chance and the expected time stays linear.
 */
export function enclosingCircle(points: [number, number][]): Circle {
  const p = [...points];
  let seed = 0x9e3779b9;
  for (let i = p.length - 1; i > 0; i--) {
    seed = (Math.imul(seed ^ (seed >>> 15), 0x2c1b3c6d) + 0x6d2b79f5) >>> 0;
    const j = seed % (i + 1);
    [p[i], p[j]] = [p[j]!, p[i]!];
  }
  const eps = 1e-7;
  const inside = (c: Circle, q: [number, number]) => Math.hypot(q[0] - c.x, q[1] - c.y) <= c.r + eps;
  const two = (a: [number, number], b: [number, number]): Circle => ({
    x: (a[0] + b[0]) / 2,
    y: (a[1] + b[1]) / 2,
    r: Math.hypot(a[0] - b[0], a[1] - b[1]) / 2,
  });
  const three = (a: [number, number], b: [number, number], c: [number, number]): Circle => {
    const d = 2 * (a[0] * (b[1] - c[1]) + b[0] * (c[1] - a[1]) + c[0] * (a[1] - b[1]));
    if (Math.abs(d) < 1e-12) {
      // Collinear: the circle on the two farthest apart.
      const cands = [two(a, b), two(a, c), two(b, c)];
      return cands.reduce((x, y) => (y.r > x.r ? y : x));
    }
    const a2 = a[0] ** 2 + a[1] ** 2,
      b2 = b[0] ** 2 + b[1] ** 2,
      c2 = c[0] ** 2 + c[1] ** 2;
    const x = (a2 * (b[1] - c[1]) + b2 * (c[1] - a[1]) + c2 * (a[1] - b[1])) / d;
    const y = (a2 * (c[0] - b[0]) + b2 * (a[0] - c[0]) + c2 * (b[0] - a[0])) / d;
    return { x, y, r: Math.hypot(a[0] - x, a[1] - y) };
  };
  if (p.length === 0) return { x: 0, y: 0, r: 0 };
  let c: Circle = { x: p[0]![0], y: p[0]![1], r: 0 };
  for (let i = 1; i < p.length; i++) {
    if (inside(c, p[i]!)) continue;
    c = { x: p[i]![0], y: p[i]![1], r: 0 };
    for (let j = 0; j < i; j++) {
      if (inside(c, p[j]!)) continue;
      c = two(p[i]!, p[j]!);
      for (let k = 0; k < j; k++) if (!inside(c, p[k]!)) c = three(p[i]!, p[j]!, p[k]!);
    }
  }
  return c;
}

/** Signed area of a contour (counter-clockwise positive). */
function ringArea(c: Contour): number {
  let a = 0;
  for (let i = 0, j = c.length - 1; i < c.length; j = i++) a += (c[j]![0] - c[i]![0]) * (c[j]![1] + c[i]![1]);
  return a / 2;
}
