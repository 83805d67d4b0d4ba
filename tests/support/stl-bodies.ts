import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";

/**
 * An exported STL taken apart without the geometry kernel: its triangles (binary STL as the 1989
 * StereoLithography Interface Specification lays it out: 80-byte header, uint32 count, 50 bytes a
 * facet), welded by exact vertex position and split into connected bodies by shared vertices.
 */
export type StlBody = { tri: Float32Array; min: [number, number, number]; max: [number, number, number] };

export function stlBodies(stl: Uint8Array): StlBody[] {
  const view = new DataView(stl.buffer, stl.byteOffset, stl.byteLength);
  const n = view.getUint32(80, true);
  const tri = new Float32Array(n * 9);
  for (let t = 0; t < n; t++) for (let j = 0; j < 9; j++) tri[t * 9 + j] = view.getFloat32(84 + 50 * t + 12 + 4 * j, true);
  const ids = new Map<string, number>();
  const vert = new Uint32Array(n * 3);
  for (let i = 0; i < n * 3; i++) {
    const key = `${tri[i * 3]},${tri[i * 3 + 1]},${tri[i * 3 + 2]}`;
    let id = ids.get(key);
    if (id === undefined) ids.set(key, (id = ids.size));
    vert[i] = id;
  }
  const parent = Array.from({ length: ids.size }, (_, i) => i);
  const find = (x: number): number => (parent[x] === x ? x : (parent[x] = find(parent[x]!)));
  for (let t = 0; t < n; t++) {
    const a = find(vert[t * 3]!);
    for (const k of [1, 2]) {
      const b = find(vert[t * 3 + k]!);
      if (a !== b) parent[b] = a;
    }
  }
  const groups = new Map<number, number[]>();
  for (let t = 0; t < n; t++) {
    const root = find(vert[t * 3]!);
    const list = groups.get(root) ?? [];
    list.push(t);
    groups.set(root, list);
  }
  return [...groups.values()].map((tris) => {
    const out = new Float32Array(tris.length * 9);
    const min: [number, number, number] = [Infinity, Infinity, Infinity],
      max: [number, number, number] = [-Infinity, -Infinity, -Infinity];
    tris.forEach((t, i) => {
      for (let j = 0; j < 9; j++) {
        const v = tri[t * 9 + j]!;
        out[i * 9 + j] = v;
        min[j % 3] = Math.min(min[j % 3]!, v);
        max[j % 3] = Math.max(max[j % 3]!, v);
      }
    });
    return { tri: out, min, max };
  });
}

/** One body as a binary STL of its own (for a height map of the slab alone). */
export function bodyStl(body: StlBody): Uint8Array {
  const n = body.tri.length / 9;
  const out = new Uint8Array(84 + 50 * n);
  const view = new DataView(out.buffer);
  view.setUint32(80, n, true);
  for (let t = 0; t < n; t++) for (let j = 0; j < 9; j++) view.setFloat32(84 + 50 * t + 12 + 4 * j, body.tri[t * 9 + j]!, true);
  return out;
}

/** The slab (the body on the bed, z = 0) and the pieces. */
export function slabAndPieces(stl: Uint8Array): { slab: StlBody; pieces: StlBody[] } {
  const bodies = stlBodies(stl);
  const slab = bodies.find((b) => Math.abs(b.min[2]) < 1e-6);
  if (!slab) throw new Error("no body stands on the bed");
  return { slab, pieces: bodies.filter((b) => b !== slab) };
}

/** The lowest upward-facing surface of a body above its base (the floor left under its deepest engraving). */
export function lowestTopSurface(body: StlBody): number {
  let low = Infinity;
  const t = body.tri;
  for (let i = 0; i < t.length; i += 9) {
    const ux = t[i + 3]! - t[i]!,
      uy = t[i + 4]! - t[i + 1]!,
      vx = t[i + 6]! - t[i]!,
      vy = t[i + 7]! - t[i + 1]!;
    const nz = ux * vy - uy * vx; // z of the facet's normal (counter-clockwise seen from outside)
    const z = Math.max(t[i + 2]!, t[i + 5]!, t[i + 8]!);
    if (nz > 1e-9 && z > body.min[2] + 1e-6) low = Math.min(low, z);
  }
  return low;
}

export type AdmeshReport = {
  facets: number;
  disconnected: number;
  parts: number;
  edgesFixed: number;
  facetsReversed: number;
  backwardsEdges: number;
  volume: number;
};

/**
 * Debian's admesh on the bytes: it repairs by default and always exits 0, so its report is parsed
 * ("Number of parts", "Edges fixed", "Facets reversed", "Backwards edges", volume) and the exit code
 * ignored (see the trade facts).
 */
export function admesh(stl: Uint8Array): AdmeshReport {
  const dir = mkdtempSync(path.join(tmpdir(), "admesh-"));
  try {
    const file = path.join(dir, "plate.stl");
    writeFileSync(file, stl);
    // --exact: match edges exactly (no tolerance welding); --normal-directions counts parts and
    // fixes facet order (reported as "Facets reversed"); --normal-values, then its volume is reported.
    const out = execFileSync("admesh", ["--exact", "--normal-directions", "--normal-values", file], { encoding: "utf8" });
    const num = (re: RegExp) => {
      const m = out.match(re);
      if (!m) throw new Error(`admesh printed no ${re}: ${out}`);
      return Number(m[1]);
    };
    return {
      facets: num(/Number of facets\s*:\s*(\d+)/),
      disconnected: num(/Total disconnected facets\s*:\s*(\d+)/),
      parts: num(/Number of parts\s*:\s*(\d+)/),
      edgesFixed: num(/Edges fixed\s*:\s*(\d+)/),
      facetsReversed: num(/Facets reversed\s*:\s*(\d+)/),
      backwardsEdges: num(/Backwards edges\s*:\s*(\d+)/),
      volume: num(/Volume\s*:\s*([-\d.e+]+)/),
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
