import type { CrossSection, Manifold } from "manifold-3d";
import type { Scope, Kernel } from "./kernel";
import type { Contour } from "./marks/text";

/** A part's footprints, measured once and shared by every piece made from it. */
export type PartFootprint = {
  /** Outline of everything the part covers seen from above (projection, outer contours only). */
  shadow: CrossSection;
  shadowArea: number;
  /** What touches the slab: the cross-section one layer above the base. */
  contact: CrossSection;
  contactArea: number;
  /** Convex hull of the shadow, for choosing a packing angle. */
  hull: [number, number][];
  height: number;
};

export function signedArea(c: Contour): number {
  let a = 0;
  for (let i = 0, j = c.length - 1; i < c.length; j = i++) a += (c[j]![0] - c[i]![0]) * (c[j]![1] + c[i]![1]);
  return a / 2;
}

/**
 * Shadow and contact footprints of a part standing on z = 0. The projection keeps holes (a ring, a
 * bored gear); an outline wants only what the part covers, so only counter-clockwise (outer)
 * contours are kept. Round offsets later add many vertices, so the shadow is simplified to 0.01 mm.
 */
export function measureFootprint(kernel: Kernel, scope: Scope, solid: Manifold, layerHeight: number): PartFootprint {
  const { CrossSection } = kernel.wasm;
  const projected = scope.track(solid.project());
  const outers = projected.toPolygons().filter((c) => signedArea(c) > 0);
  const shadow = scope.track(scope.track(new CrossSection(outers, "Positive")).simplify(0.01));
  const box = solid.boundingBox();
  const height = box.max[2] - box.min[2];
  const contact = scope.track(solid.slice(Math.min(layerHeight, height / 2)));
  return {
    shadow,
    shadowArea: shadow.area(),
    contact,
    contactArea: contact.area(),
    hull: convexHull(shadow.toPolygons().flat()),
    height,
  };
}

/** Andrew's monotone chain. */
export function convexHull(points: [number, number][]): [number, number][] {
  const p = [...points].sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  if (p.length < 3) return p;
  const cross = (o: [number, number], a: [number, number], b: [number, number]) =>
    (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
  const lower: [number, number][] = [];
  for (const q of p) {
    while (lower.length >= 2 && cross(lower[lower.length - 2]!, lower[lower.length - 1]!, q) <= 0) lower.pop();
    lower.push(q);
  }
  const upper: [number, number][] = [];
  for (let i = p.length - 1; i >= 0; i--) {
    const q = p[i]!;
    while (upper.length >= 2 && cross(upper[upper.length - 2]!, upper[upper.length - 1]!, q) <= 0) upper.pop();
    upper.push(q);
  }
  return [...lower.slice(0, -1), ...upper.slice(0, -1)];
}

/** Axis-aligned extent of points turned by `deg` about the origin. */
export function rotatedBounds(points: [number, number][], deg: number) {
  const r = (deg * Math.PI) / 180,
    c = Math.cos(r),
    s = Math.sin(r);
  let minX = Infinity,
    minY = Infinity,
    maxX = -Infinity,
    maxY = -Infinity;
  for (const [x, y] of points) {
    const X = c * x - s * y,
      Y = s * x + c * y;
    if (X < minX) minX = X;
    if (X > maxX) maxX = X;
    if (Y < minY) minY = Y;
    if (Y > maxY) maxY = Y;
  }
  return { minX, minY, maxX, maxY, w: maxX - minX, h: maxY - minY };
}

/**
 * The turn (0–90°) that gives the smallest bounding rectangle: one side of the minimum-area rectangle
 * always lies along a hull edge (Freeman & Shapira, 1975), so only hull edge angles are tried.
 * Prefers no turn at all unless turning saves more than 2 %.
 */
export function bestPackingAngle(hull: [number, number][]): number {
  const base = rotatedBounds(hull, 0);
  let best = 0,
    bestArea = base.w * base.h;
  for (let i = 0; i < hull.length; i++) {
    const a = hull[i]!,
      b = hull[(i + 1) % hull.length]!;
    let deg = (-Math.atan2(b[1] - a[1], b[0] - a[0]) * 180) / Math.PI;
    deg = ((deg % 90) + 90) % 90;
    const r = rotatedBounds(hull, deg);
    if (r.w * r.h < bestArea * 0.98 - 1e-9) {
      bestArea = r.w * r.h;
      best = deg;
    }
  }
  return Math.round(best * 1000) / 1000;
}
