import type { WeldedStl } from "./stl";

/**
 * Edge use of a welded triangle set. A closed, consistently oriented surface uses every undirected
 * edge in exactly two triangles, once in each direction (each directed edge once).
 */
export type EdgeReport = {
  edges: number;
  /** Undirected edges in one triangle only. */
  open: number;
  /** Undirected edges in more than two triangles. */
  nonManifold: number;
  /** Edges in two triangles that run the same way (a triangle turned over). */
  misoriented: number;
  /** Triangles with a repeated corner (no area, no edges of their own). */
  degenerate: number;
  /** A corner of the first open or misoriented edge, for the message. */
  firstBad?: { kind: "open" | "non_manifold" | "misoriented"; at: [number, number, number] };
};

export function edgeReport(m: WeldedStl): EdgeReport {
  const n = m.triangles;
  const nv = m.positions.length / 3;
  const t = m.tris;
  // Directed edges by their start corner (compressed rows): out[u] lists every v of an edge u → v.
  const first = new Uint32Array(nv + 1);
  let degenerate = 0;
  const bad = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    const a = t[3 * i]!, b = t[3 * i + 1]!, c = t[3 * i + 2]!;
    if (a === b || b === c || a === c) {
      bad[i] = 1;
      degenerate++;
      continue;
    }
    first[a + 1]!++;
    first[b + 1]!++;
    first[c + 1]!++;
  }
  for (let v = 0; v < nv; v++) first[v + 1]! += first[v]!;
  const out = new Uint32Array(first[nv]!);
  const fill = first.slice(0, nv);
  for (let i = 0; i < n; i++) {
    if (bad[i]) continue;
    const a = t[3 * i]!, b = t[3 * i + 1]!, c = t[3 * i + 2]!;
    out[fill[a]!++] = b;
    out[fill[b]!++] = c;
    out[fill[c]!++] = a;
  }
  const countIn = (u: number, v: number) => {
    let k = 0;
    for (let i = first[u]!; i < first[u + 1]!; i++) if (out[i] === v) k++;
    return k;
  };
  const firstAt = (u: number, v: number, at: number) => {
    for (let i = first[u]!; i < at; i++) if (out[i] === v) return false;
    return true;
  };
  let edges = 0, open = 0, nonManifold = 0, misoriented = 0;
  let firstBad: EdgeReport["firstBad"];
  const at = (v: number): [number, number, number] => [m.positions[3 * v]!, m.positions[3 * v + 1]!, m.positions[3 * v + 2]!];
  for (let u = 0; u < nv; u++) {
    for (let i = first[u]!; i < first[u + 1]!; i++) {
      const v = out[i]!;
      if (!firstAt(u, v, i)) continue; // counted at its first listing
      const f = countIn(u, v), b = countIn(v, u);
      // Each undirected edge once: from its smaller corner, or from the larger when nothing runs back.
      if (u > v && b > 0) continue;
      edges++;
      const total = f + b;
      if (total === 1) {
        open++;
        firstBad ??= { kind: "open", at: at(u) };
      } else if (total > 2) {
        nonManifold++;
        firstBad ??= { kind: "non_manifold", at: at(u) };
      } else if (f !== 1) {
        misoriented++;
        firstBad ??= { kind: "misoriented", at: at(u) };
      }
    }
  }
  return { edges, open, nonManifold, misoriented, degenerate, firstBad };
}

/** One connected body: its triangles (indices into the mesh), bounds and signed volume. */
export type Body = {
  tris: Uint32Array;
  min: [number, number, number];
  max: [number, number, number];
  volume: number;
};

/** Split into connected bodies (triangles that share a welded corner belong together). */
export function connectedBodies(m: WeldedStl): Body[] {
  const nv = m.positions.length / 3;
  const parent = new Int32Array(nv);
  for (let i = 0; i < nv; i++) parent[i] = i;
  const find = (x: number) => {
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]!]!;
      x = parent[x]!;
    }
    return x;
  };
  const unite = (a: number, b: number) => {
    const ra = find(a), rb = find(b);
    if (ra !== rb) parent[ra < rb ? rb : ra] = ra < rb ? ra : rb;
  };
  const t = m.tris;
  for (let i = 0; i < m.triangles; i++) {
    unite(t[3 * i]!, t[3 * i + 1]!);
    unite(t[3 * i]!, t[3 * i + 2]!);
  }
  // Bodies numbered in order of their first triangle; triangles grouped by a counting sort.
  const bodyOfRoot = new Int32Array(nv).fill(-1);
  const bodyOfTri = new Int32Array(m.triangles);
  let bodies = 0;
  for (let i = 0; i < m.triangles; i++) {
    const r = find(t[3 * i]!);
    if (bodyOfRoot[r] === -1) bodyOfRoot[r] = bodies++;
    bodyOfTri[i] = bodyOfRoot[r]!;
  }
  const counts = new Uint32Array(bodies + 1);
  for (let i = 0; i < m.triangles; i++) counts[bodyOfTri[i]! + 1]!++;
  for (let b = 0; b < bodies; b++) counts[b + 1]! += counts[b]!;
  const order = new Uint32Array(m.triangles);
  const fill = counts.slice(0, bodies);
  for (let i = 0; i < m.triangles; i++) order[fill[bodyOfTri[i]!]!++] = i;
  const p = m.positions;
  const out: Body[] = [];
  for (let b = 0; b < bodies; b++) {
    const tris = order.subarray(counts[b]!, counts[b + 1]!);
    let x0 = Infinity, y0 = Infinity, z0 = Infinity, x1 = -Infinity, y1 = -Infinity, z1 = -Infinity;
    let vol = 0;
    for (const i of tris) {
      const a = 3 * t[3 * i]!, bb = 3 * t[3 * i + 1]!, c = 3 * t[3 * i + 2]!;
      const ax = p[a]!, ay = p[a + 1]!, az = p[a + 2]!;
      const bx = p[bb]!, by = p[bb + 1]!, bz = p[bb + 2]!;
      const cx = p[c]!, cy = p[c + 1]!, cz = p[c + 2]!;
      // Signed volume of the tetrahedron from the origin (divergence theorem), summed.
      vol += ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx);
    }
    // Bounds from the body's corners (every corner is in some triangle of the body).
    for (const i of tris) {
      for (let c = 0; c < 3; c++) {
        const v = 3 * t[3 * i + c]!;
        const x = p[v]!, y = p[v + 1]!, z = p[v + 2]!;
        if (x < x0) x0 = x;
        if (x > x1) x1 = x;
        if (y < y0) y0 = y;
        if (y > y1) y1 = y;
        if (z < z0) z0 = z;
        if (z > z1) z1 = z;
      }
    }
    out.push({ tris, min: [x0, y0, z0], max: [x1, y1, z1], volume: vol / 6 });
  }
  return out;
}
