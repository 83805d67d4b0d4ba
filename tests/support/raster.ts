import { PNG } from "pngjs";

/**
 * A top-down height map of an STL, computed from its triangles alone (independent of the geometry
 * kernel): for each pixel centre, the highest triangle above it. `pxPerMm` pixels per millimetre.
 */
export type HeightMap = { width: number; height: number; pxPerMm: number; originX: number; originY: number; z: Float32Array };

export function rasterizeStl(
  stl: Uint8Array,
  pxPerMm: number,
  region?: { minX: number; minY: number; maxX: number; maxY: number },
): HeightMap {
  const view = new DataView(stl.buffer, stl.byteOffset, stl.byteLength);
  const n = view.getUint32(80, true);
  const tri = new Float32Array(n * 9);
  for (let t = 0; t < n; t++) for (let j = 0; j < 9; j++) tri[t * 9 + j] = view.getFloat32(84 + 50 * t + 12 + 4 * j, true);
  let minX = Infinity,
    minY = Infinity,
    maxX = -Infinity,
    maxY = -Infinity;
  for (let i = 0; i < tri.length; i += 3) {
    minX = Math.min(minX, tri[i]!);
    maxX = Math.max(maxX, tri[i]!);
    minY = Math.min(minY, tri[i + 1]!);
    maxY = Math.max(maxY, tri[i + 1]!);
  }
  const r = region ?? { minX, minY, maxX, maxY };
  const width = Math.ceil((r.maxX - r.minX) * pxPerMm);
  const height = Math.ceil((r.maxY - r.minY) * pxPerMm);
  const z = new Float32Array(width * height).fill(-Infinity);
  for (let t = 0; t < n; t++) {
    const o = t * 9;
    const ax = tri[o]!,
      ay = tri[o + 1]!,
      az = tri[o + 2]!;
    const bx = tri[o + 3]!,
      by = tri[o + 4]!,
      bz = tri[o + 5]!;
    const cx = tri[o + 6]!,
      cy = tri[o + 7]!,
      cz = tri[o + 8]!;
    const det = (by - cy) * (ax - cx) + (cx - bx) * (ay - cy);
    if (Math.abs(det) < 1e-12) continue; // vertical faces cover no pixel centres
    const x0 = Math.max(0, Math.floor((Math.min(ax, bx, cx) - r.minX) * pxPerMm));
    const x1 = Math.min(width - 1, Math.ceil((Math.max(ax, bx, cx) - r.minX) * pxPerMm));
    const y0 = Math.max(0, Math.floor((Math.min(ay, by, cy) - r.minY) * pxPerMm));
    const y1 = Math.min(height - 1, Math.ceil((Math.max(ay, by, cy) - r.minY) * pxPerMm));
    for (let py = y0; py <= y1; py++) {
      const y = r.minY + (py + 0.5) / pxPerMm;
      for (let px = x0; px <= x1; px++) {
        const x = r.minX + (px + 0.5) / pxPerMm;
        const l1 = ((by - cy) * (x - cx) + (cx - bx) * (y - cy)) / det;
        const l2 = ((cy - ay) * (x - cx) + (ax - cx) * (y - cy)) / det;
        const l3 = 1 - l1 - l2;
        if (l1 < -1e-9 || l2 < -1e-9 || l3 < -1e-9) continue;
        const h = l1 * az + l2 * bz + l3 * cz;
        // Row 0 is the top of the image: flip y.
        const k = (height - 1 - py) * width + px;
        if (h > z[k]!) z[k] = h;
      }
    }
  }
  return { width, height, pxPerMm, originX: r.minX, originY: r.minY, z };
}

/** Grey pixels (RGBA) from a height map: `dark(z)` decides what is drawn dark. */
export function toRgba(map: HeightMap, dark: (z: number) => boolean): Uint8ClampedArray {
  const out = new Uint8ClampedArray(map.width * map.height * 4);
  for (let i = 0; i < map.z.length; i++) {
    const v = dark(map.z[i]!) ? 0 : 255;
    out[i * 4] = out[i * 4 + 1] = out[i * 4 + 2] = v;
    out[i * 4 + 3] = 255;
  }
  return out;
}

/** Shade heights for a person to look at (debugging and screenshots). */
export function heightPng(map: HeightMap): Buffer {
  const png = new PNG({ width: map.width, height: map.height });
  let lo = Infinity,
    hi = -Infinity;
  for (const v of map.z)
    if (Number.isFinite(v)) {
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
  for (let i = 0; i < map.z.length; i++) {
    const v = map.z[i]!;
    const g = Number.isFinite(v) ? 40 + Math.round((200 * (v - lo)) / Math.max(1e-9, hi - lo)) : 255;
    png.data[i * 4] = png.data[i * 4 + 1] = png.data[i * 4 + 2] = g;
    png.data[i * 4 + 3] = 255;
  }
  return PNG.sync.write(png);
}
