/**
 * What a file is and how much of it we accept, told from its bytes without reading the mesh: the web
 * process refuses what is plainly not a mesh from here, and leaves every real read to the workers.
 */
import { MeshImportError, UnsupportedFormatError } from "../errors";
import { sniffImportFormat, type ImportFormatId } from "../formats";

export type MeshFormat = ImportFormatId;

export type ImportLimits = {
  maxBytes: number;
  /** Triangles per file, counted as placed (a component used twice counts twice). */
  maxTriangles: number;
  /** Vertices per file as listed (3MF, OBJ); STL has three per triangle by definition. */
  maxVertices: number;
  /** Bytes a 3MF package may inflate to, all parts read together. */
  maxInflatedBytes: number;
  /** Bodies a 3MF build may place once its components are expanded. */
  maxBodies: number;
  /** Component references a 3MF build may follow while expanding. */
  maxComponents: number;
};

export const IMPORT_LIMITS: ImportLimits = {
  maxBytes: 200 * 1024 * 1024,
  maxTriangles: 2_000_000,
  // A closed mesh has about half as many vertices as triangles (Euler: V = T/2 + 2 − 2g), so 1 M
  // serve the triangle limit; twice that leaves room for seams and unwelded exports.
  maxVertices: 2_000_000,
  // What the two limits above can need as 3MF XML: a <triangle v1=".." v2=".." v3=".."/> with
  // seven-digit indices is ~55 bytes, a <vertex x=".." y=".." z=".."/> with 4–6 decimals ~60 bytes,
  // so 2 M × 55 + 2 M × 60 ≈ 230 MB, plus indentation and colour attributes: 300 MiB (≈ 315 MB)
  // and not a byte more may come out of one package.
  maxInflatedBytes: 300 * 1024 * 1024,
  // One file is one part or a tray of them; a thousand bodies is far past any plate (our own figure).
  maxBodies: 1_000,
  maxComponents: 10_000,
};

/** The format the bytes themselves show, or null: no file-name fallback (for refusing early). */
export function sniffFormat(bytes: Uint8Array): MeshFormat | null {
  return sniffImportFormat(bytes, bytes.byteLength);
}

/**
 * The format from a file's first bytes and its total size alone (for a stream stored before it is
 * read whole): a binary STL is recognised by its triangle count at byte 80 and the size 84 + 50·n.
 * `head` should hold at least the first 4 kB (all of a smaller file).
 */
export function sniffHead(head: Uint8Array, size: number): MeshFormat | null {
  return sniffImportFormat(head, size);
}

/** The format by content; a file named .stl that matches nothing goes to the STL reader, which says what is wrong. */
export function detectFormat(bytes: Uint8Array, fileName: string): MeshFormat {
  const sniffed = sniffFormat(bytes);
  if (sniffed) return sniffed;
  if (fileName.toLowerCase().endsWith(".stl")) return "stl";
  if (bytes.byteLength === 0) throw new MeshImportError("empty", fileName, "the file is empty");
  throw new UnsupportedFormatError(fileName, "this is not a mesh file we recognise");
}
