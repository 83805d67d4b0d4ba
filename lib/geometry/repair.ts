import type { IndexedMesh } from "./mesh";

/**
 * Mesh repairs that are safe to make without asking: they never move a vertex by more than the weld
 * tolerance and never invent a surface. Everything here is linear in the triangle count (hash tables
 * and compressed adjacency lists in typed arrays), so a 2-million-triangle file stays fast.
 */

/** Merge vertices with bit-identical coordinates (−0 and +0 count as equal). Unused vertices are dropped. */
export function weldExact(positions: Float32Array, triangles: Uint32Array): { mesh: IndexedMesh; merged: number } {
  const nIn = positions.length / 3;
  const bits = new Uint32Array(3);
  const f = new Float32Array(bits.buffer);
  let size = 1;
  while (size < triangles.length * 2) size <<= 1;
  const mask = size - 1;
  const table = new Int32Array(size).fill(-1); // slot -> output vertex
  const remap = new Int32Array(nIn).fill(-1); // input vertex -> output vertex
  const out = new Float32Array(Math.min(nIn, triangles.length) * 3);
  const outBits = new Uint32Array(out.buffer);
  let nOut = 0;
  let used = 0;
  const tri = new Uint32Array(triangles.length);
  for (let t = 0; t < triangles.length; t++) {
    const v = triangles[t]!;
    let o = remap[v]!;
    if (o < 0) {
      used++;
      f[0] = positions[v * 3]! + 0;
      f[1] = positions[v * 3 + 1]! + 0;
      f[2] = positions[v * 3 + 2]! + 0;
      const a = bits[0]!,
        b = bits[1]!,
        c = bits[2]!;
      let h = (Math.imul(a, 0x9e3779b1) ^ Math.imul(b, 0x85ebca77) ^ Math.imul(c, 0xc2b2ae3d)) >>> 0;
      h ^= h >>> 15;
      let slot = h & mask;
      for (;;) {
        const s = table[slot]!;
        if (s < 0) {
          o = nOut++;
          table[slot] = o;
          outBits[o * 3] = a;
          outBits[o * 3 + 1] = b;
          outBits[o * 3 + 2] = c;
          break;
        }
        if (outBits[s * 3] === a && outBits[s * 3 + 1] === b && outBits[s * 3 + 2] === c) {
          o = s;
          break;
        }
        slot = (slot + 1) & mask;
      }
      remap[v] = o;
    }
    tri[t] = o;
  }
  return { mesh: { vertProperties: out.slice(0, nOut * 3), triVerts: tri }, merged: used - nOut };
}

/** Drop triangles that use one vertex twice (left behind by welding); they have no area. */
export function dropDegenerate(mesh: IndexedMesh): { mesh: IndexedMesh; dropped: number } {
  const t = mesh.triVerts;
  let keep = 0;
  const out = new Uint32Array(t.length);
  for (let i = 0; i < t.length; i += 3) {
    const a = t[i]!,
      b = t[i + 1]!,
      c = t[i + 2]!;
    if (a === b || b === c || a === c) continue;
    out[keep++] = a;
    out[keep++] = b;
    out[keep++] = c;
  }
  const dropped = (t.length - keep) / 3;
  return { mesh: dropped ? { vertProperties: mesh.vertProperties, triVerts: out.slice(0, keep) } : mesh, dropped };
}

/**
 * Undirected edges grouped by their smaller vertex (compressed sparse rows): for vertex v, entries
 * start[v] .. start[v+1]-1 hold the larger end, the triangle, and whether that triangle runs the edge
 * from the smaller end to the larger.
 */
type EdgeIndex = { start: Uint32Array; other: Uint32Array; owner: Uint32Array; forward: Uint8Array };

function edgeIndex(mesh: IndexedMesh): EdgeIndex {
  const t = mesh.triVerts;
  const nv = mesh.vertProperties.length / 3;
  const start = new Uint32Array(nv + 1);
  for (let i = 0; i < t.length; i += 3) {
    for (let e = 0; e < 3; e++) {
      const a = t[i + e]!,
        b = t[i + ((e + 1) % 3)]!;
      start[Math.min(a, b) + 1]!++;
    }
  }
  for (let v = 0; v < nv; v++) start[v + 1]! += start[v]!;
  const fill = start.slice(0, nv);
  const other = new Uint32Array(t.length);
  const owner = new Uint32Array(t.length);
  const forward = new Uint8Array(t.length);
  for (let i = 0; i < t.length; i += 3) {
    for (let e = 0; e < 3; e++) {
      const a = t[i + e]!,
        b = t[i + ((e + 1) % 3)]!;
      const k = fill[Math.min(a, b)]!++;
      other[k] = Math.max(a, b);
      owner[k] = i / 3;
      forward[k] = a < b ? 1 : 0;
    }
  }
  return { start, other, owner, forward };
}

/**
 * Edges that keep a mesh from being a closed solid, each undirected edge counted once: `open` (one
 * triangle: a hole), `nonManifold` (three or more triangles), `misoriented` (two triangles running it
 * the same way — fixable by orientConsistently).
 */
export function badEdges(mesh: IndexedMesh): { open: number; nonManifold: number; misoriented: number } {
  const { start, other, forward } = edgeIndex(mesh);
  const nv = mesh.vertProperties.length / 3;
  let open = 0,
    nonManifold = 0,
    misoriented = 0;
  for (let lo = 0; lo < nv; lo++) {
    const s = start[lo]!,
      e = start[lo + 1]!;
    for (let k = s; k < e; k++) {
      const hi = other[k]!;
      let first = true;
      for (let j = s; j < k; j++)
        if (other[j] === hi) {
          first = false;
          break;
        }
      if (!first) continue;
      let n = 0,
        fwd = 0;
      for (let j = k; j < e; j++)
        if (other[j] === hi) {
          n++;
          fwd += forward[j]!;
        }
      if (n === 1) open++;
      else if (n > 2) nonManifold++;
      else if (fwd !== 1) misoriented++;
    }
  }
  return { open, nonManifold, misoriented };
}

/**
 * Make winding consistent within each connected piece: walk from triangle to neighbouring triangle
 * and flip any neighbour that runs a shared edge in the same direction. Needs a mesh where each
 * undirected edge has at most two triangles. Returns how many triangles were flipped.
 */
export function orientConsistently(mesh: IndexedMesh): number {
  const t = mesh.triVerts;
  const nt = t.length / 3;
  const { start, other, owner } = edgeIndex(mesh);
  const runsForward = (tri: number, a: number, b: number) => {
    const i = tri * 3;
    for (let e = 0; e < 3; e++) if (t[i + e] === a && t[i + ((e + 1) % 3)] === b) return true;
    return false;
  };
  const seen = new Uint8Array(nt);
  const queue = new Uint32Array(nt);
  let flipped = 0;
  for (let seed = 0; seed < nt; seed++) {
    if (seen[seed]) continue;
    seen[seed] = 1;
    let head = 0,
      tail = 0;
    queue[tail++] = seed;
    while (head < tail) {
      const tri = queue[head++]!;
      const i = tri * 3;
      for (let e = 0; e < 3; e++) {
        const a = t[i + e]!,
          b = t[i + ((e + 1) % 3)]!;
        const lo = Math.min(a, b),
          hi = Math.max(a, b);
        for (let k = start[lo]!; k < start[lo + 1]!; k++) {
          const n = owner[k]!;
          if (other[k] !== hi || n === tri || seen[n]) continue;
          seen[n] = 1;
          if (runsForward(n, a, b)) {
            const j = n * 3;
            const tmp = t[j + 1]!;
            t[j + 1] = t[j + 2]!;
            t[j + 2] = tmp;
            flipped++;
          }
          queue[tail++] = n;
        }
      }
    }
  }
  return flipped;
}

/** Split into vertex-connected pieces, each with its own compact vertex list. */
export function splitShells(mesh: IndexedMesh): IndexedMesh[] {
  const t = mesh.triVerts;
  const nv = mesh.vertProperties.length / 3;
  const parent = new Int32Array(nv);
  for (let v = 0; v < nv; v++) parent[v] = v;
  const find = (v: number) => {
    while (parent[v] !== v) {
      parent[v] = parent[parent[v]!]!;
      v = parent[v]!;
    }
    return v;
  };
  for (let i = 0; i < t.length; i += 3) {
    const a = find(t[i]!),
      b = find(t[i + 1]!),
      c = find(t[i + 2]!);
    parent[b] = a;
    parent[find(c)] = a;
  }
  const shellOf = new Map<number, number>();
  const counts: number[] = [];
  const triShell = new Uint32Array(t.length / 3);
  for (let i = 0; i < t.length; i += 3) {
    const r = find(t[i]!);
    let s = shellOf.get(r);
    if (s === undefined) {
      s = counts.length;
      shellOf.set(r, s);
      counts.push(0);
    }
    counts[s]!++;
    triShell[i / 3] = s;
  }
  if (counts.length <= 1) return [mesh];
  const shells = counts.map((c) => ({ tris: new Uint32Array(c * 3), n: 0 }));
  for (let i = 0; i < t.length; i += 3) {
    const s = shells[triShell[i / 3]!]!;
    s.tris[s.n++] = t[i]!;
    s.tris[s.n++] = t[i + 1]!;
    s.tris[s.n++] = t[i + 2]!;
  }
  return shells.map((s) => compact(mesh.vertProperties, s.tris));
}

/** Keep only the vertices `triangles` use, renumbered in first-use order. */
export function compact(positions: Float32Array, triangles: Uint32Array): IndexedMesh {
  const remap = new Int32Array(positions.length / 3).fill(-1);
  const tri = new Uint32Array(triangles.length);
  const out: number[] = [];
  let n = 0;
  for (let i = 0; i < triangles.length; i++) {
    const v = triangles[i]!;
    let o = remap[v]!;
    if (o < 0) {
      o = remap[v] = n++;
      out.push(positions[v * 3]!, positions[v * 3 + 1]!, positions[v * 3 + 2]!);
    }
    tri[i] = o;
  }
  return { vertProperties: Float32Array.from(out), triVerts: tri };
}

/** Reverse every triangle (turn an inside-out mesh right way out). */
export function flipAll(mesh: IndexedMesh): void {
  const t = mesh.triVerts;
  for (let i = 0; i < t.length; i += 3) {
    const b = t[i + 1]!;
    t[i + 1] = t[i + 2]!;
    t[i + 2] = b;
  }
}

/** Apply a vertex merge map (from → to) to the triangles, in place. */
export function applyMerge(mesh: IndexedMesh, from: Uint32Array, to: Uint32Array): void {
  if (from.length === 0) return;
  const map = new Map<number, number>();
  for (let i = 0; i < from.length; i++) map.set(from[i]!, to[i]!);
  const t = mesh.triVerts;
  for (let i = 0; i < t.length; i++) {
    const m = map.get(t[i]!);
    if (m !== undefined) t[i] = m;
  }
}
