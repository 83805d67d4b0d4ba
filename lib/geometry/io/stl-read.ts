import { MeshImportError, UnsupportedFormatError } from "../errors";
import type { RawModel, RawObject } from "./raw";
import { isBinaryStl, looksLikeAsciiStl } from "../formats";

export { isBinaryStl, looksLikeAsciiStl };

/**
 * STL (3D Systems StereoLithography Interface Specification, 1989). Binary files are told from ASCII by
 * the size rule 84 + 50·n with n the header's facet count — not by the word "solid", which many binary
 * exporters write into the header anyway.
 */
export function readBinaryStl(bytes: Uint8Array, file: string, maxTriangles: number): RawModel {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (bytes.byteLength < 84) {
    throw new MeshImportError(
      "truncated",
      file,
      `the file is ${bytes.byteLength} bytes; a binary STL needs at least 84 (header and triangle count)`,
    );
  }
  const n = view.getUint32(80, true);
  const room = Math.floor((bytes.byteLength - 84) / 50);
  const expected = 84 + 50 * n;
  if (bytes.byteLength !== expected) {
    const diff = bytes.byteLength - expected;
    const why =
      diff < 0
        ? `it is ${(-diff).toLocaleString("en-US")} bytes short: the file is cut off or its triangle count is wrong`
        : `it has ${diff.toLocaleString("en-US")} bytes too many: its triangle count is wrong or the file was damaged (for example ` +
          `saved as text)`;
    throw new MeshImportError(
      "bad_triangle_count",
      file,
      `the header says ${n.toLocaleString("en-US")} triangles, which need ${expected.toLocaleString("en-US")} bytes (84 + 50 × ` +
        `${n}), but the file is ${bytes.byteLength.toLocaleString("en-US")} bytes; ${why}`,
      {
        declared: n,
        room,
      },
    );
  }
  if (n === 0) throw new MeshImportError("empty", file, "the file holds no triangles");
  if (n > maxTriangles) throw tooMany(file, n, maxTriangles);
  const positions = new Float32Array(n * 9);
  let off = 84 + 12; // skip each facet's normal: it is recomputed from the winding
  for (let t = 0, k = 0; t < n; t++, off += 50) {
    for (let j = 0; j < 9; j++) positions[k++] = view.getFloat32(off + 4 * j, true);
  }
  return { format: "stl", declaredUnit: null, objects: [soup(stem(file), positions)] };
}

/**
 * ASCII STL, read tolerantly: any solid name (or none), several solids in one file, a missing
 * `endsolid`, missing, blank or wrong facet normals (normals are ignored and recomputed).
 * Loops must have exactly three vertices.
 */
export function readAsciiStl(bytes: Uint8Array, file: string, maxTriangles: number): RawModel {
  const text = new TextDecoder("utf-8").decode(bytes);
  const coords: number[] = [];
  const objects: RawObject[] = [];
  let solidName: string | null = null;
  let inLoop = false;
  let loopVerts = 0;
  let triangles = 0;
  let lineNo = 0;
  let pos = 0;
  const len = text.length;
  const flush = () => {
    if (coords.length > 0) objects.push(soup(solidName || stem(file), Float32Array.from(coords)));
    coords.length = 0;
  };
  while (pos < len) {
    let end = text.indexOf("\n", pos);
    if (end < 0) end = len;
    const line = text.slice(pos, end).trim();
    pos = end + 1;
    lineNo++;
    if (line === "") continue;
    const sp = line.search(/\s/);
    const word = (sp < 0 ? line : line.slice(0, sp)).toLowerCase();
    switch (word) {
      case "solid":
        flush();
        solidName = sp < 0 ? "" : line.slice(sp).trim();
        break;
      case "facet":
        if (inLoop) throw malformed(file, lineNo, "a new facet starts inside a loop");
        break;
      case "outer":
        inLoop = true;
        loopVerts = 0;
        break;
      case "vertex": {
        if (!inLoop) throw malformed(file, lineNo, "a vertex outside an outer loop");
        const parts = line.slice(sp).trim().split(/\s+/);
        if (parts.length !== 3) throw malformed(file, lineNo, `a vertex needs three numbers, found ${parts.length}`);
        for (const p of parts) {
          const v = Number(p);
          if (Number.isNaN(v) && !/^[+-]?(nan|inf)/i.test(p)) throw malformed(file, lineNo, `"${p.slice(0, 20)}" is not a number`);
          coords.push(v);
        }
        loopVerts++;
        break;
      }
      case "endloop":
        if (loopVerts !== 3) throw malformed(file, lineNo, `a facet has ${loopVerts} vertices; STL facets are triangles (3)`);
        inLoop = false;
        triangles++;
        if (triangles > maxTriangles) throw tooMany(file, triangles, maxTriangles);
        break;
      case "endfacet":
        break;
      case "endsolid":
        flush();
        solidName = null;
        break;
      default:
        throw malformed(file, lineNo, `unexpected "${word.slice(0, 20)}"`);
    }
  }
  if (inLoop) throw new MeshImportError("truncated", file, "the file ends inside a facet");
  flush();
  if (triangles === 0) throw new MeshImportError("empty", file, "the file holds no triangles");
  return { format: "stl", declaredUnit: null, objects };
}

export function readStl(bytes: Uint8Array, file: string, maxTriangles: number): RawModel {
  if (bytes.byteLength === 0) throw new MeshImportError("empty", file, "the file is empty");
  if (isBinaryStl(bytes)) return readBinaryStl(bytes, file, maxTriangles);
  if (looksLikeAsciiStl(bytes)) return readAsciiStl(bytes, file, maxTriangles);
  if (bytes.byteLength < 84)
    throw new UnsupportedFormatError(file, `${bytes.byteLength} bytes is too short for a binary STL and it is not ASCII STL`);
  return readBinaryStl(bytes, file, maxTriangles); // reports the lying or truncated count
}

function soup(name: string, positions: Float32Array): RawObject {
  const n = positions.length / 3;
  const triangles = new Uint32Array(n);
  for (let i = 0; i < n; i++) triangles[i] = i;
  return { name, positions, triangles };
}

function malformed(file: string, line: number, what: string) {
  return new MeshImportError("malformed", file, `line ${line}: ${what}`, { line });
}

export function tooMany(file: string, n: number, max: number) {
  return new MeshImportError(
    "too_many_triangles",
    file,
    `${n.toLocaleString("en-US")} triangles is more than the limit of ${max.toLocaleString("en-US")} per file; simplify the mesh first`,
    {
      triangles: n,
      limit: max,
    },
  );
}

export function stem(file: string): string {
  const base = file.split(/[\\/]/).pop() ?? file;
  const dot = base.lastIndexOf(".");
  return dot > 0 ? base.slice(0, dot) : base;
}
