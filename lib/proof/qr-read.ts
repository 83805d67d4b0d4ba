import jsQR from "jsqr";
import type { Box2 } from "./planar";

/**
 * A top view of the slab as a height raster (highest upward-facing surface over each pixel centre),
 * drawn by scanlines from the exported triangles, then read by jsQR. Only the region asked for is
 * drawn, so a 250 mm slab costs no more than its QR code.
 */
export type HeightRaster = { width: number; height: number; pxPerMm: number; z: Float32Array };

export function heightRaster(
  positions: Float32Array,
  tris: Uint32Array,
  triIds: ArrayLike<number>,
  region: Box2,
  pxPerMm: number,
): HeightRaster {
  const width = Math.max(1, Math.ceil((region.maxX - region.minX) * pxPerMm));
  const height = Math.max(1, Math.ceil((region.maxY - region.minY) * pxPerMm));
  const z = new Float32Array(width * height).fill(-Infinity);
  const P = positions;
  for (let k = 0; k < triIds.length; k++) {
    const t = triIds[k]!;
    const a = 3 * tris[3 * t]!,
      b = 3 * tris[3 * t + 1]!,
      c = 3 * tris[3 * t + 2]!;
    const ax = P[a]!,
      ay = P[a + 1]!,
      az = P[a + 2]!;
    const bx = P[b]!,
      by = P[b + 1]!,
      bz = P[b + 2]!;
    const cx = P[c]!,
      cy = P[c + 1]!,
      cz = P[c + 2]!;
    if (
      Math.max(ax, bx, cx) < region.minX ||
      Math.min(ax, bx, cx) > region.maxX ||
      Math.max(ay, by, cy) < region.minY ||
      Math.min(ay, by, cy) > region.maxY
    )
      continue;
    const det = (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
    if (Math.abs(det) < 1e-12) continue; // seen edge-on: covers no pixel centre
    // The triangle's plane z = z0 + gx·(x − ax) + gy·(y − ay).
    const gx = ((bz - az) * (cy - ay) - (cz - az) * (by - ay)) / det;
    const gy = ((cz - az) * (bx - ax) - (bz - az) * (cx - ax)) / det;
    const r0 = Math.max(0, Math.ceil((Math.min(ay, by, cy) - region.minY) * pxPerMm - 0.5));
    const r1 = Math.min(height - 1, Math.floor((Math.max(ay, by, cy) - region.minY) * pxPerMm - 0.5));
    for (let r = r0; r <= r1; r++) {
      const y = region.minY + (r + 0.5) / pxPerMm;
      // Where the scanline crosses the three edges.
      let x0 = Infinity,
        x1 = -Infinity;
      for (let e = 0; e < 3; e++) {
        const px = e === 0 ? ax : e === 1 ? bx : cx,
          py = e === 0 ? ay : e === 1 ? by : cy;
        const qx = e === 0 ? bx : e === 1 ? cx : ax,
          qy = e === 0 ? by : e === 1 ? cy : ay;
        if ((py <= y && y <= qy) || (qy <= y && y <= py)) {
          const x = py === qy ? Math.min(px, qx) : px + ((y - py) / (qy - py)) * (qx - px);
          const xe = py === qy ? Math.max(px, qx) : x;
          if (x < x0) x0 = x;
          if (xe > x1) x1 = xe;
        }
      }
      if (x0 > x1) continue;
      const c0 = Math.max(0, Math.ceil((x0 - region.minX) * pxPerMm - 0.5));
      const c1 = Math.min(width - 1, Math.floor((x1 - region.minX) * pxPerMm - 0.5));
      // Row 0 of the image is the far edge of the slab (largest y): the view from above.
      const row = (height - 1 - r) * width;
      for (let col = c0; col <= c1; col++) {
        const x = region.minX + (col + 0.5) / pxPerMm;
        const h = az + gx * (x - ax) + gy * (y - ay);
        if (h > z[row + col]!) z[row + col] = h;
      }
    }
  }
  return { width, height, pxPerMm, z };
}

/** Decode a QR code from a raster: `dark(z)` says which heights print dark. */
export function decodeRaster(map: HeightRaster, dark: (z: number) => boolean): string | null {
  const rgba = new Uint8ClampedArray(map.width * map.height * 4);
  for (let i = 0; i < map.z.length; i++) {
    const v = dark(map.z[i]!) ? 0 : 255;
    rgba[4 * i] = rgba[4 * i + 1] = rgba[4 * i + 2] = v;
    rgba[4 * i + 3] = 255;
  }
  // Dark modules on a light ground, as ISO/IEC 18004 prints them: no inverted reading is tried.
  return jsQR(rgba, map.width, map.height, { inversionAttempts: "dontInvert" })?.data ?? null;
}
