/**
 * A part prepared once for every build that uses it: the mesh as read, welded and turned to stand on
 * the slab, how many closed shells it is, what the importer noted (unit, warnings, size), and its
 * measures (footprints, hull, volume, the small-parts fit) at each layer height measured so far.
 * Reading a part and measuring it cost more than the rest of a build (making the kernel's solid of
 * every part alone is most of it), and neither changes while the part does not, so they are kept as
 * a blob in the blob store, found by `preparedSource` (lib/parts/prepared-source.ts) of the part's
 * own blob and its reading.
 *
 * The bytes: "SLABPREP" (8), a little-endian uint32 header length, the header as UTF-8 JSON, padding
 * to 4 bytes, then the mesh's vertex positions (float32 × 3) and triangles (uint32 × 3). Numbers in
 * the header are written by JSON.stringify, which gives the shortest text that reads back to the same
 * double (ECMA-262, Number::toString), so every measure comes back bit for bit.
 */
import type { IndexedMesh } from "./mesh";
import type { PartMeasure } from "./pieces";
import type { ReadPart } from "./units";

/**
 * Raise when the reading, orienting or measuring of a part changes what it gives: blobs prepared by
 * an older engine are then not found (their source keys differ) and the parts are prepared again.
 * prepared.test.ts pins the measures of a fixed shape to this number.
 */
export const PREPARED_VERSION = 1;

const MAGIC = "SLABPREP";

export type PreparedPart = {
  mesh: IndexedMesh;
  shells: number;
  read: Pick<ReadPart, "unit" | "warnings" | "size">;
  /** By layer height (mm). */
  measures: Map<number, PartMeasure>;
};

export class PreparedPartError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "PreparedPartError";
  }
}

export function encodePrepared(p: PreparedPart): Uint8Array {
  const header = new TextEncoder().encode(
    JSON.stringify({
      shells: p.shells,
      read: p.read,
      measures: [...p.measures].sort((a, b) => a[0] - b[0]),
      vertices: p.mesh.vertProperties.length,
      triangles: p.mesh.triVerts.length,
    }),
  );
  const at = align4(12 + header.byteLength);
  const out = new Uint8Array(at + 4 * (p.mesh.vertProperties.length + p.mesh.triVerts.length));
  out.set(new TextEncoder().encode(MAGIC), 0);
  new DataView(out.buffer).setUint32(8, header.byteLength, true);
  out.set(header, 12);
  if (LITTLE) {
    out.set(new Uint8Array(p.mesh.vertProperties.buffer, p.mesh.vertProperties.byteOffset, 4 * p.mesh.vertProperties.length), at);
    out.set(
      new Uint8Array(p.mesh.triVerts.buffer, p.mesh.triVerts.byteOffset, 4 * p.mesh.triVerts.length),
      at + 4 * p.mesh.vertProperties.length,
    );
    return out;
  }
  const view = new DataView(out.buffer);
  let o = at;
  for (const v of p.mesh.vertProperties) {
    view.setFloat32(o, v, true);
    o += 4;
  }
  for (const t of p.mesh.triVerts) {
    view.setUint32(o, t, true);
    o += 4;
  }
  return out;
}

export function decodePrepared(bytes: Uint8Array): PreparedPart {
  if (bytes.byteLength < 12 || new TextDecoder().decode(bytes.subarray(0, 8)) !== MAGIC)
    throw new PreparedPartError("Not a prepared part (no SLABPREP mark).");
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const len = view.getUint32(8, true);
  if (12 + len > bytes.byteLength) throw new PreparedPartError("The prepared part's header runs past its end.");
  const h = JSON.parse(new TextDecoder().decode(bytes.subarray(12, 12 + len))) as {
    shells: number;
    read: PreparedPart["read"];
    measures: [number, PartMeasure][];
    vertices: number;
    triangles: number;
  };
  const at = align4(12 + len);
  if (at + 4 * (h.vertices + h.triangles) !== bytes.byteLength)
    throw new PreparedPartError(
      `The prepared part holds ${bytes.byteLength} bytes; its header asks for ${at + 4 * (h.vertices + h.triangles)}.`,
    );
  if (LITTLE) {
    const vertProperties = new Float32Array(bytes.slice(at, at + 4 * h.vertices).buffer);
    const triVerts = new Uint32Array(bytes.slice(at + 4 * h.vertices).buffer);
    return { mesh: { vertProperties, triVerts }, shells: h.shells, read: h.read, measures: new Map(h.measures) };
  }
  const vertProperties = new Float32Array(h.vertices);
  const triVerts = new Uint32Array(h.triangles);
  let o = at;
  for (let i = 0; i < h.vertices; i++, o += 4) vertProperties[i] = view.getFloat32(o, true);
  for (let i = 0; i < h.triangles; i++, o += 4) triVerts[i] = view.getUint32(o, true);
  return { mesh: { vertProperties, triVerts }, shells: h.shells, read: h.read, measures: new Map(h.measures) };
}

/** The machine's own byte order is little-endian (as on x86 and ARM hosts): the arrays are copied whole. */
const LITTLE = new Uint8Array(Uint16Array.of(1).buffer)[0] === 1;
const align4 = (n: number) => (n + 3) & ~3;
