import earcut from "earcut";
import { MeshImportError } from "../errors";
import type { RawModel, RawObject } from "./raw";
import { stem, tooMany } from "./stl-read";

/**
 * Wavefront OBJ: `v` and `f` records (texture and normal indices ignored), 1-based and negative
 * (relative) indices, `o`/`g` starting a new named object. Polygons with more than three corners are
 * triangulated with earcut in their own plane (Newell normal), so concave faces come out right where a
 * fan would fold over.
 */
export function readObj(bytes: Uint8Array, file: string, limits: { maxTriangles: number; maxVertices: number }): RawModel {
  const { maxTriangles, maxVertices } = limits;
  const text = new TextDecoder("utf-8").decode(bytes);
  const verts: number[] = [];
  type Group = { name: string; tris: number[] };
  const groups: Group[] = [];
  let current: Group = { name: stem(file), tris: [] };
  let triangles = 0;
  let lineNo = 0;
  let pos = 0;
  const len = text.length;
  const start = (name: string) => {
    if (current.tris.length > 0) groups.push(current);
    current = { name: name || stem(file), tris: [] };
  };
  while (pos < len) {
    let end = text.indexOf("\n", pos);
    if (end < 0) end = len;
    let line = text.slice(pos, end);
    pos = end + 1;
    lineNo++;
    // Backslash continues a record on the next line.
    while (line.endsWith("\\") && pos < len) {
      let e2 = text.indexOf("\n", pos);
      if (e2 < 0) e2 = len;
      line = line.slice(0, -1) + " " + text.slice(pos, e2);
      pos = e2 + 1;
      lineNo++;
    }
    const hash = line.indexOf("#");
    if (hash >= 0) line = line.slice(0, hash);
    line = line.trim();
    if (line === "") continue;
    const parts = line.split(/\s+/);
    const kw = parts[0]!;
    if (kw === "v") {
      if (parts.length < 4) throw malformed(file, lineNo, "a vertex needs x, y and z");
      if (verts.length / 3 >= maxVertices)
        throw tooManyVertices(
          file,
          verts.length / 3 + 1,
          maxVertices,
          `more than the limit of ${maxVertices.toLocaleString("en-US")} per file`,
        );
      for (let a = 1; a <= 3; a++) {
        const v = Number(parts[a]);
        if (Number.isNaN(v) && !/^[+-]?(nan|inf)/i.test(parts[a]!))
          throw malformed(file, lineNo, `"${parts[a]!.slice(0, 20)}" is not a number`);
        verts.push(v);
      }
    } else if (kw === "f") {
      const nv = verts.length / 3;
      const idx: number[] = [];
      for (let i = 1; i < parts.length; i++) {
        const ref = parts[i]!.split("/")[0]!;
        const k = Number.parseInt(ref, 10);
        if (!/^[+-]?\d+$/.test(ref) || k === 0) throw malformed(file, lineNo, `"${parts[i]!.slice(0, 20)}" is not a vertex reference`);
        const at = k > 0 ? k - 1 : nv + k;
        if (at < 0 || at >= nv) {
          throw new MeshImportError(
            "index_out_of_range",
            file,
            `line ${lineNo}: face refers to vertex ${k}, but only ${nv} vertices are defined so far`,
            { line: lineNo, index: k, vertices: nv },
          );
        }
        idx.push(at);
      }
      if (idx.length < 3) throw malformed(file, lineNo, `a face needs at least three corners, found ${idx.length}`);
      if (idx.length === 3) current.tris.push(idx[0]!, idx[1]!, idx[2]!);
      else triangulatePolygon(verts, idx, current.tris);
      triangles = triangles + idx.length - 2;
      if (triangles > maxTriangles) throw tooMany(file, triangles, maxTriangles);
    } else if (kw === "o" || kw === "g") {
      start(parts.slice(1).join(" "));
    }
    // vt, vn, vp, s, usemtl, mtllib, l, p and the rest carry nothing we print.
  }
  if (current.tris.length > 0) groups.push(current);
  if (groups.length === 0)
    throw new MeshImportError("empty", file, verts.length ? "the file has vertices but no faces" : "the file holds no faces");
  // Each vertex serves at least one triangle, so at most three per triangle can be used (the floor
  // lets a few stray points through).
  const nv = verts.length / 3;
  if (nv > Math.max(3 * triangles, 65_536))
    throw tooManyVertices(
      file,
      nv,
      Math.max(3 * triangles, 65_536),
      `for ${triangles.toLocaleString("en-US")} triangles: no face uses most of them`,
    );
  const positions = Float32Array.from(verts);
  // Each object shares the file's vertex list; the weld step drops the ones it does not use.
  const objects: RawObject[] = groups.map((g) => ({ name: g.name, positions, triangles: Uint32Array.from(g.tris) }));
  return { format: "obj", declaredUnit: null, objects };
}

function triangulatePolygon(verts: number[], idx: number[], out: number[]): void {
  // Newell's method: a robust normal for a planar (or nearly planar) polygon.
  let nx = 0,
    ny = 0,
    nz = 0;
  for (let i = 0; i < idx.length; i++) {
    const a = idx[i]! * 3,
      b = idx[(i + 1) % idx.length]! * 3;
    nx += (verts[a + 1]! - verts[b + 1]!) * (verts[a + 2]! + verts[b + 2]!);
    ny += (verts[a + 2]! - verts[b + 2]!) * (verts[a]! + verts[b]!);
    nz += (verts[a]! - verts[b]!) * (verts[a + 1]! + verts[b + 1]!);
  }
  // Project onto the plane of the two axes other than the normal's largest component, keeping winding.
  const ax = Math.abs(nx),
    ay = Math.abs(ny),
    az = Math.abs(nz);
  const [u, v, sign] = az >= ax && az >= ay ? [0, 1, Math.sign(nz)] : ax >= ay ? [1, 2, Math.sign(nx)] : [2, 0, Math.sign(ny)];
  const flat: number[] = [];
  for (const i of idx) flat.push(verts[i * 3 + u]!, sign < 0 ? -verts[i * 3 + v]! : verts[i * 3 + v]!);
  const tri = earcut(flat);
  if (tri.length === 0) {
    // degenerate polygon: the weld step drops what is empty
    for (let i = 1; i + 1 < idx.length; i++) out.push(idx[0]!, idx[i]!, idx[i + 1]!);
    return;
  }
  // earcut's output winding does not follow the input; restore the polygon's own orientation.
  for (let t = 0; t < tri.length; t += 3) {
    const a = tri[t]!,
      b = tri[t + 1]!,
      c = tri[t + 2]!;
    const cross =
      (flat[b * 2]! - flat[a * 2]!) * (flat[c * 2 + 1]! - flat[a * 2 + 1]!) -
      (flat[b * 2 + 1]! - flat[a * 2 + 1]!) * (flat[c * 2]! - flat[a * 2]!);
    if (cross >= 0) out.push(idx[a]!, idx[b]!, idx[c]!);
    else out.push(idx[a]!, idx[c]!, idx[b]!);
  }
}

function tooManyVertices(file: string, n: number, limit: number, why: string) {
  return new MeshImportError("too_many_vertices", file, `${n.toLocaleString("en-US")} vertices is ${why}`, { vertices: n, limit });
}

function malformed(file: string, line: number, what: string) {
  return new MeshImportError("malformed", file, `line ${line}: ${what}`, { line });
}
