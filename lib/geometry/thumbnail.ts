import type { PlacedPiece, PlateLayout } from "./build-plate";
import type { Kernel } from "./kernel";
import type { IndexedMesh } from "./mesh";
import { signedArea } from "./footprint";

/**
 * A small top view of a part as SVG: its shadow (everything it covers) in the piece colour and its
 * contact footprint (what stands on the slab) darker, scaled to fit a square, y up.
 */
export function topViewSvg(
  kernel: Kernel,
  mesh: IndexedMesh,
  layerHeight = 0.2,
  size = 96,
): { svg: string; shadowArea: number; contactArea: number } {
  const scope = kernel.scope();
  try {
    const { Manifold, Mesh } = kernel.wasm;
    const solid = scope.track(new Manifold(new Mesh({ numProp: 3, vertProperties: mesh.vertProperties, triVerts: mesh.triVerts })));
    const shadow = scope.track(solid.project());
    const box = solid.boundingBox();
    const height = box.max[2] - box.min[2];
    const contact = scope.track(solid.slice(box.min[2] + Math.min(layerHeight, height / 2)));
    const outer = shadow.toPolygons().filter((c) => signedArea(c) > 0);
    const b = shadow.bounds();
    const w = b.max[0] - b.min[0],
      h = b.max[1] - b.min[1];
    const pad = 4;
    const s = (size - 2 * pad) / Math.max(w, h, 1e-6);
    const ox = pad + (size - 2 * pad - w * s) / 2,
      oy = pad + (size - 2 * pad - h * s) / 2;
    const path = (polys: [number, number][][]) =>
      polys
        .map(
          (c) =>
            `M${c.map(([x, y]) => `${(ox + (x - b.min[0]) * s).toFixed(1)} ${(size - oy - (y - b.min[1]) * s).toFixed(1)}`).join("L")}Z`,
        )
        .join("");
    const svg =
      `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${size} ${size}" width="${size}" height="${size}">` +
      `<path d="${path(outer)}" fill="#9aa0a8" fill-rule="nonzero"/>` +
      `<path d="${path(contact.toPolygons())}" fill="#4a4f57" fill-rule="evenodd"/>` +
      `</svg>`;
    return { svg, shadowArea: outer.reduce((a, c) => a + signedArea(c), 0), contactArea: contact.area() };
  } finally {
    scope.close();
  }
}

/**
 * A top view of a whole slab as SVG, to scale: the slab, its marks (with `markOutlines` from the
 * build) and each piece's outline, fitted into `width` × `height` pixels, y up. Pieces in `marked`
 * (missing or defective) are drawn as dashed empty outlines, as they look on the slab.
 */
export function slabTopSvg(
  layout: PlateLayout,
  pieces: Pick<PlacedPiece, "outline" | "number">[],
  width = 240,
  height = 180,
  marked: Set<number> = new Set(),
): string {
  const W = layout.slab.width,
    D = layout.slab.depth;
  const pad = 6;
  const s = Math.min((width - 2 * pad) / W, (height - 2 * pad) / D);
  const ox = (width - W * s) / 2,
    oy = (height - D * s) / 2;
  const path = (polys: [number, number][][]) =>
    polys.map((c) => `M${c.map(([x, y]) => `${(ox + x * s).toFixed(1)} ${(height - oy - y * s).toFixed(1)}`).join("L")}Z`).join("");
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img" aria-label="Top view of a ${W.toFixed(0)} × ${D.toFixed(0)} mm slab">` +
    `<path d="${path(layout.slab.outline)}" fill="#efe8dc" stroke="#c9bfae" stroke-width="1"/>` +
    (layout.markOutlines?.length ? `<path d="${path(layout.markOutlines)}" fill="#8a7f6c" fill-rule="nonzero"/>` : "") +
    (pieces.length
      ? `<path d="${path(pieces.filter((p) => !marked.has(p.number)).flatMap((p) => p.outline))}" fill="#4a4f57" fill-opacity="0.85" ` +
        `fill-rule="nonzero"/>`
      : "") +
    (marked.size
      ? `<path d="${path(pieces.filter((p) => marked.has(p.number)).flatMap((p) => p.outline))}" fill="none" stroke="#c0392b" ` +
        `stroke-width="2" stroke-dasharray="4 2"/>`
      : "") +
    `</svg>`
  );
}
