import type { Kernel } from "./kernel";
import type { IndexedMesh } from "./mesh";
import { signedArea } from "./footprint";

/**
 * A small top view of a part as SVG: its shadow (everything it covers) in the piece colour and its
 * contact footprint (what stands on the slab) darker, scaled to fit a square, y up.
 */
export function topViewSvg(kernel: Kernel, mesh: IndexedMesh, layerHeight = 0.2, size = 96): { svg: string; shadowArea: number; contactArea: number } {
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
    const w = b.max[0] - b.min[0], h = b.max[1] - b.min[1];
    const pad = 4;
    const s = (size - 2 * pad) / Math.max(w, h, 1e-6);
    const ox = pad + ((size - 2 * pad) - w * s) / 2, oy = pad + ((size - 2 * pad) - h * s) / 2;
    const path = (polys: [number, number][][]) =>
      polys.map((c) => `M${c.map(([x, y]) => `${(ox + (x - b.min[0]) * s).toFixed(1)} ${(size - oy - (y - b.min[1]) * s).toFixed(1)}`).join("L")}Z`).join("");
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
