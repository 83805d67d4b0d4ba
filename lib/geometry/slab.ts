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
    const cx = (b.minX + b.maxX) / 2, cy = (b.minY + b.maxY) / 2;
    let r = 0;
    for (const x of content.boxes) for (const [px, py] of [[x.minX, x.minY], [x.maxX, x.minY], [x.minX, x.maxY], [x.maxX, x.maxY]] as const) r = Math.max(r, Math.hypot(px - cx, py - cy));
    // Grow by the margin, and by the polygon's inset so the inscribed edges keep the full margin.
    const radius = (r + m) / Math.cos(Math.PI / DISC_SEGMENTS);
    return scope.track(new CrossSection([disc(cx, cy, radius)]));
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
