import type { CrossSection } from "manifold-3d";
import type { Kernel, Scope } from "./kernel";
import type { Contour } from "./marks/text";
import type { SlabOptions } from "./options";

export type SlabShape = SlabOptions["slab"]["shape"];
type Box = { minX: number; minY: number; maxX: number; maxY: number };

/** Segments per quarter circle for slab corners: area error −1.6·10⁻⁴·r² per corner, far below a layer. */
export const CORNER_SEGMENTS = 32;
export const DISC_SEGMENTS = 256;

/** A rectangle with rounded corners, counter-clockwise, corners sampled with `perQuarter` segments. */
export function roundedRect(x0: number, y0: number, w: number, h: number, r: number, perQuarter = CORNER_SEGMENTS): Contour {
  const rr = Math.max(0, Math.min(r, w / 2, h / 2));
  if (rr === 0) return [[x0, y0], [x0 + w, y0], [x0 + w, y0 + h], [x0, y0 + h]];
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
  return pts;
}

export function disc(cx: number, cy: number, r: number, segments = DISC_SEGMENTS): Contour {
  const pts: Contour = [];
  for (let i = 0; i < segments; i++) {
    const a = (2 * Math.PI * i) / segments;
    pts.push([cx + r * Math.cos(a), cy + r * Math.sin(a)]);
  }
  return pts;
}

/**
 * The slab's outline around everything on it plus the margin: a rounded rectangle, a disc, or a
 * contour that follows the pieces (their shadows grown by the margin, gaps between them closed, and
 * the result kept as one outline).
 */
export function slabOutline(kernel: Kernel, scope: Scope, o: SlabOptions, content: { boxes: Box[]; pieceShadows: CrossSection[]; ext: number }): CrossSection {
  const { CrossSection } = kernel.wasm;
  const m = o.slab.margin;
  const b = content.boxes.reduce(
    (acc, x) => ({ minX: Math.min(acc.minX, x.minX), minY: Math.min(acc.minY, x.minY), maxX: Math.max(acc.maxX, x.maxX), maxY: Math.max(acc.maxY, x.maxY) }),
    { minX: Infinity, minY: Infinity, maxX: -Infinity, maxY: -Infinity },
  );
  if (o.slab.shape === "disc") {
    const pts = content.boxes.flatMap((x) => [[x.minX, x.minY], [x.maxX, x.minY], [x.minX, x.maxY], [x.maxX, x.maxY]] as [number, number][]);
    const c = enclosingCircle(pts);
    // Grow by the margin, and by the polygon's inset so the inscribed edges keep the full margin.
    const radius = (c.r + m) / Math.cos(Math.PI / DISC_SEGMENTS);
    return scope.track(new CrossSection([disc(c.x, c.y, radius)]));
  }
  if (o.slab.shape === "contour") {
    const grown = content.pieceShadows.map((s) => scope.track(s.offset(content.ext + m, "Round", 2, 48)));
    const rects = content.boxes.map((x) => [[x.minX - m, x.minY - m], [x.maxX + m, x.minY - m], [x.maxX + m, x.maxY + m], [x.minX - m, x.maxY + m]] as Contour);
    let cs = scope.track(CrossSection.union([...grown, ...rects.map((r) => scope.track(new CrossSection([r])))]));
    // Close the gaps between neighbours (grow, then shrink by the same amount).
    const close = Math.max(o.layout.spacing, 2) + m;
    cs = scope.track(scope.track(cs.offset(close, "Round", 2, 48)).offset(-close, "Round", 2, 48));
    const islands = cs.decompose().map((x) => scope.track(x));
    if (islands.length > 1) cs = scope.track(cs.hull());
    return scope.track(cs.simplify(0.01));
  }
  const w = b.maxX - b.minX + 2 * m, h = b.maxY - b.minY + 2 * m;
  return scope.track(new CrossSection([roundedRect(b.minX - m, b.minY - m, w, h, o.slab.cornerRadius)]));
}

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
  const two = (a: [number, number], b: [number, number]): Circle => ({ x: (a[0] + b[0]) / 2, y: (a[1] + b[1]) / 2, r: Math.hypot(a[0] - b[0], a[1] - b[1]) / 2 });
  const three = (a: [number, number], b: [number, number], c: [number, number]): Circle => {
    const d = 2 * (a[0] * (b[1] - c[1]) + b[0] * (c[1] - a[1]) + c[0] * (a[1] - b[1]));
    if (Math.abs(d) < 1e-12) {
      // Collinear: the circle on the two farthest apart.
      const cands = [two(a, b), two(a, c), two(b, c)];
      return cands.reduce((x, y) => (y.r > x.r ? y : x));
    }
    const a2 = a[0] ** 2 + a[1] ** 2, b2 = b[0] ** 2 + b[1] ** 2, c2 = c[0] ** 2 + c[1] ** 2;
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
