import type { IndexedMesh } from "../mesh";

const HEADER = "Slabwright binary STL";

/**
 * Binary STL (3D Systems StereoLithography Interface Specification): an 80-byte header that must not
 * begin with "solid", a uint32 facet count, then 50 bytes per facet. Floats go through a Float32Array
 * view over the facet records rather than DataView calls, which is several times faster.
 */
export function writeBinaryStl(meshes: IndexedMesh[]): Uint8Array {
  let n = 0;
  for (const m of meshes) n += m.triVerts.length / 3;
  const out = new Uint8Array(84 + 50 * n);
  for (let i = 0; i < HEADER.length; i++) out[i] = HEADER.charCodeAt(i);
  new DataView(out.buffer).setUint32(80, n, true);
  // 50-byte records are not 4-byte aligned from offset 84 for odd facets, so write each record's
  // 48 float bytes into an aligned scratch buffer and copy it in.
  const scratch = new Float32Array(12);
  const scratchBytes = new Uint8Array(scratch.buffer);
  let off = 84;
  for (const m of meshes) {
    const p = m.vertProperties;
    const t = m.triVerts;
    for (let i = 0; i < t.length; i += 3) {
      const a = t[i]! * 3, b = t[i + 1]! * 3, c = t[i + 2]! * 3;
      const ax = p[a]!, ay = p[a + 1]!, az = p[a + 2]!;
      const bx = p[b]!, by = p[b + 1]!, bz = p[b + 2]!;
      const cx = p[c]!, cy = p[c + 1]!, cz = p[c + 2]!;
      const ux = bx - ax, uy = by - ay, uz = bz - az;
      const vx = cx - ax, vy = cy - ay, vz = cz - az;
      let nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
      const len = Math.hypot(nx, ny, nz) || 1;
      nx /= len; ny /= len; nz /= len;
      scratch[0] = nx; scratch[1] = ny; scratch[2] = nz;
      scratch[3] = ax; scratch[4] = ay; scratch[5] = az;
      scratch[6] = bx; scratch[7] = by; scratch[8] = bz;
      scratch[9] = cx; scratch[10] = cy; scratch[11] = cz;
      out.set(scratchBytes, off);
      // attribute byte count stays 0 (already zero-filled)
      off += 50;
    }
  }
  return out;
}
