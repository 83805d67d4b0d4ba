/**
 * The proof's own binary STL reader (3D Systems StereoLithography Interface Specification: an
 * 80-byte header, a little-endian uint32 facet count, then 50 bytes per facet — normal, three
 * vertices as float32, a uint16 attribute). It shares no code with the engine's importer, so a fault
 * in one is not hidden by the same fault in the other.
 *
 * Vertices are welded by exact position (their float32 bits, with −0 read as 0): a closed plate
 * written by any correct writer repeats every corner bit for bit, so no tolerance is wanted, and a
 * tolerance would hide the gap a faulty writer leaves.
 */
export type WeldedStl = {
  /** Triangles in the file. */
  triangles: number;
  /** Welded corners: x, y, z per vertex (float32, as the file stores them). */
  positions: Float32Array;
  /** Three vertex indices per triangle, in the file's order. */
  tris: Uint32Array;
};

export class StlProofError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "StlProofError";
  }
}

export function readWeldedStl(bytes: Uint8Array): WeldedStl {
  if (bytes.byteLength < 84) throw new StlProofError(`The STL has ${bytes.byteLength} bytes; a binary STL has at least 84.`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const n = view.getUint32(80, true);
  if (bytes.byteLength !== 84 + 50 * n)
    throw new StlProofError(`The STL says ${n} facets, which take ${84 + 50 * n} bytes; the file has ${bytes.byteLength}.`);
  // An open-addressing table of corner bits → vertex index (+1; 0 is empty), kept under half full.
  // A closed mesh has about half as many corners as triangles, so the table starts at about four
  // slots a corner (small enough to stay in cache) and doubles when a file has more.
  let size = 1024;
  while (size < 2 * n) size <<= 1;
  let mask = size - 1;
  let limit = size >>> 1;
  let table = new Int32Array(size);
  let store = new Uint32Array(Math.max(3, Math.ceil(n * 0.75) * 3));
  let count = 0;
  const tris = new Uint32Array(3 * n);
  const hash = (x: number, y: number, z: number) => {
    const h = (Math.imul(x, 0x9e3779b1) ^ Math.imul(y, 0x85ebca77) ^ Math.imul(z, 0xc2b2ae3d)) >>> 0;
    return h ^ (h >>> 15);
  };
  for (let t = 0; t < n; t++) {
    const base = 84 + 50 * t + 12;
    for (let c = 0; c < 3; c++) {
      const o = base + 12 * c;
      let x = view.getUint32(o, true),
        y = view.getUint32(o + 4, true),
        z = view.getUint32(o + 8, true);
      if (x === 0x80000000) x = 0;
      if (y === 0x80000000) y = 0;
      if (z === 0x80000000) z = 0;
      let h = hash(x, y, z) & mask;
      for (;;) {
        const slot = table[h]!;
        if (slot === 0) {
          if (count >= limit) {
            // Half full: double the table and put every corner back.
            size <<= 1;
            mask = size - 1;
            limit = size >>> 1;
            table = new Int32Array(size);
            for (let v = 0; v < count; v++) {
              let g = hash(store[3 * v]!, store[3 * v + 1]!, store[3 * v + 2]!) & mask;
              while (table[g] !== 0) g = (g + 1) & mask;
              table[g] = v + 1;
            }
            h = hash(x, y, z) & mask;
            while (table[h] !== 0) h = (h + 1) & mask;
          }
          if (3 * count + 3 > store.length) {
            const grown = new Uint32Array(store.length * 2);
            grown.set(store);
            store = grown;
          }
          // IEEE 754 binary32: all exponent bits set is an infinity or NaN.
          if ((x & 0x7f800000) === 0x7f800000 || (y & 0x7f800000) === 0x7f800000 || (z & 0x7f800000) === 0x7f800000) {
            throw new StlProofError(`The STL has a vertex that is not a finite number (vertex ${count + 1}).`);
          }
          store[3 * count] = x;
          store[3 * count + 1] = y;
          store[3 * count + 2] = z;
          table[h] = ++count;
          tris[3 * t + c] = count - 1;
          break;
        }
        const v = slot - 1;
        if (store[3 * v] === x && store[3 * v + 1] === y && store[3 * v + 2] === z) {
          tris[3 * t + c] = v;
          break;
        }
        h = (h + 1) & mask;
      }
    }
  }
  // The corners' bits read as the floats they are (a view, no copy).
  const positions = new Float32Array(store.buffer, 0, 3 * count);
  return { triangles: n, positions, tris };
}
