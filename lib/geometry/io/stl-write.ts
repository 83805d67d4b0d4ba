import type { IndexedMesh } from "../mesh";

const HEADER = "Slabwright binary STL";

/**
 * Binary STL (3D Systems StereoLithography Interface Specification): an 80-byte header that must not
 * begin with "solid", a uint32 facet count, then 50 bytes per facet (normal, three vertices as
 * little-endian float32, a zero uint16).
 *
 * Speed: facet records start every 50 bytes, so only every other record is 4-byte aligned. Even
 * records get their floats written straight through a Float32Array over the output; odd records start
 * two bytes into a word, so their floats are computed into an aligned scratch and written as whole
 * 32-bit words, each made of the high half of one float and the low half of the next. No per-field
 * DataView calls. (Little-endian hosts only, which is every platform Node and browsers run on.)
 */
export function writeBinaryStl(meshes: IndexedMesh[]): Uint8Array {
  let n = 0;
  for (const m of meshes) n += m.triVerts.length / 3;
  const out = new Uint8Array(84 + 50 * n);
  for (let i = 0; i < HEADER.length; i++) out[i] = HEADER.charCodeAt(i);
  new DataView(out.buffer).setUint32(80, n, true);
  const words = out.byteLength >>> 2;
  const o32 = new Uint32Array(out.buffer, 0, words);
  const of32 = new Float32Array(out.buffer, 0, words);
  const scratch = new Float32Array(12);
  const s32 = new Uint32Array(scratch.buffer);
  let facet = 0;
  for (const m of meshes) {
    const p = m.vertProperties;
    const t = m.triVerts;
    for (let i = 0; i < t.length; i += 3, facet++) {
      const a = t[i]! * 3,
        b = t[i + 1]! * 3,
        c = t[i + 2]! * 3;
      const ax = p[a]!,
        ay = p[a + 1]!,
        az = p[a + 2]!;
      const bx = p[b]!,
        by = p[b + 1]!,
        bz = p[b + 2]!;
      const cx = p[c]!,
        cy = p[c + 1]!,
        cz = p[c + 2]!;
      const ux = bx - ax,
        uy = by - ay,
        uz = bz - az;
      const vx = cx - ax,
        vy = cy - ay,
        vz = cz - az;
      const nx = uy * vz - uz * vy,
        ny = uz * vx - ux * vz,
        nz = ux * vy - uy * vx;
      const inv = 1 / (Math.sqrt(nx * nx + ny * ny + nz * nz) || 1);
      // Even facet 2k starts at word 21 + 25k; odd facet 2k+1 starts in the upper half of word 33 + 25k.
      const even = (facet & 1) === 0;
      const f = even ? of32 : scratch;
      const k = even ? 21 + 25 * (facet >>> 1) : 0;
      f[k] = nx * inv;
      f[k + 1] = ny * inv;
      f[k + 2] = nz * inv;
      f[k + 3] = ax;
      f[k + 4] = ay;
      f[k + 5] = az;
      f[k + 6] = bx;
      f[k + 7] = by;
      f[k + 8] = bz;
      f[k + 9] = cx;
      f[k + 10] = cy;
      f[k + 11] = cz;
      if (!even) {
        const w = 33 + 25 * (facet >>> 1);
        o32[w] = s32[0]! << 16; // low half: the previous facet's zero attribute
        for (let j = 0; j < 11; j++) o32[w + 1 + j] = (s32[j]! >>> 16) | (s32[j + 1]! << 16);
        o32[w + 12] = s32[11]! >>> 16; // high half: this facet's zero attribute
      }
    }
  }
  return out;
}
