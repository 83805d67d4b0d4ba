import type { IndexedMesh } from "@/lib/geometry/mesh";

/** An axis-aligned box as an indexed mesh, outward winding (our own fixture). */
export function box(sx: number, sy: number, sz: number, at: [number, number, number] = [0, 0, 0]): IndexedMesh {
  const [x0, y0, z0] = at;
  const v: number[] = [];
  for (let i = 0; i < 8; i++) v.push(x0 + (i & 1 ? sx : 0), y0 + (i & 2 ? sy : 0), z0 + (i & 4 ? sz : 0));
  // prettier-ignore
  const t = [0,2,1, 1,2,3, 4,5,6, 5,7,6, 0,1,4, 1,5,4, 2,6,3, 3,6,7, 0,4,2, 2,4,6, 1,3,5, 3,7,5];
  return { vertProperties: new Float32Array(v), triVerts: new Uint32Array(t) };
}

/** Triangle soup of a mesh, as an ASCII STL string. */
export function asciiStl(mesh: IndexedMesh, name = "fixture"): string {
  const p = mesh.vertProperties,
    t = mesh.triVerts;
  const lines = [`solid ${name}`];
  for (let i = 0; i < t.length; i += 3) {
    lines.push("  facet normal 0 0 0", "    outer loop");
    for (let k = 0; k < 3; k++) lines.push(`      vertex ${p[t[i + k]! * 3]} ${p[t[i + k]! * 3 + 1]} ${p[t[i + k]! * 3 + 2]}`);
    lines.push("    endloop", "  endfacet");
  }
  lines.push(`endsolid ${name}`);
  return lines.join("\n");
}

export function concat(...meshes: IndexedMesh[]): IndexedMesh {
  const v: number[] = [];
  const t: number[] = [];
  for (const m of meshes) {
    const base = v.length / 3;
    v.push(...m.vertProperties);
    for (const i of m.triVerts) t.push(i + base);
  }
  return { vertProperties: new Float32Array(v), triVerts: new Uint32Array(t) };
}

export const bytes = (s: string) => new TextEncoder().encode(s);

/** An axis-aligned box from corner to corner, 12 triangles facing out (or in: the wall of a cavity). */
export function boxShell([x0, y0, z0]: number[], [x1, y1, z1]: number[], inward = false): IndexedMesh {
  const v = [x0, y0, z0, x1, y0, z0, x1, y1, z0, x0, y1, z0, x0, y0, z1, x1, y0, z1, x1, y1, z1, x0, y1, z1] as number[];
  const f = [0, 2, 1, 0, 3, 2, 4, 5, 6, 4, 6, 7, 0, 1, 5, 0, 5, 4, 1, 2, 6, 1, 6, 5, 2, 3, 7, 2, 7, 6, 3, 0, 4, 3, 4, 7];
  if (inward) for (let i = 0; i < f.length; i += 3) [f[i + 1], f[i + 2]] = [f[i + 2]!, f[i + 1]!];
  return { vertProperties: Float32Array.from(v), triVerts: Uint32Array.from(f) };
}
