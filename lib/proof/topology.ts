import type { WeldedStl } from "./stl";

/**
 * Edge use of a welded triangle set. A closed, consistently oriented surface uses every undirected
 * edge in exactly two triangles, once in each direction (each directed edge once).
 */
type BadKind = "open" | "non_manifold" | "misoriented";

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
  firstBad?: { kind: BadKind; at: [number, number, number] };
};

/**
 * One pass over the edges, in typed arrays only: every undirected edge is listed under its smaller
 * corner (compressed rows, the larger corner and the direction packed in one integer), then each row
 * is tallied with a per-corner stamp, so a corner of high degree (the pole of a turned part) costs
 * its degree and not its degree squared.
 */
export function edgeReport(m: WeldedStl): EdgeReport {
  const n = m.triangles;
  const nv = m.positions.length / 3;
  const t = m.tris;
  const start = new Uint32Array(nv + 1);
  let degenerate = 0;
  for (let i = 0; i < 3 * n; i += 3) {
    const a = t[i]!,
      b = t[i + 1]!,
      c = t[i + 2]!;
    if (a === b || b === c || a === c) {
      degenerate++;
      continue;
    }
    start[(a < b ? a : b) + 1]!++;
    start[(b < c ? b : c) + 1]!++;
    start[(c < a ? c : a) + 1]!++;
  }
  for (let v = 0; v < nv; v++) start[v + 1]! += start[v]!;
  // Row of the smaller corner: 2 × the larger corner, + 1 when the edge runs from the larger to the smaller.
  const row = new Uint32Array(start[nv]!);
  const fill = start.slice(0, nv);
  for (let i = 0; i < 3 * n; i += 3) {
    const a = t[i]!,
      b = t[i + 1]!,
      c = t[i + 2]!;
    if (a === b || b === c || a === c) continue;
    if (a < b) row[fill[a]!++] = 2 * b;
    else row[fill[b]!++] = 2 * a + 1;
    if (b < c) row[fill[b]!++] = 2 * c;
    else row[fill[c]!++] = 2 * b + 1;
    if (c < a) row[fill[c]!++] = 2 * a;
    else row[fill[a]!++] = 2 * c + 1;
  }
  const mark = new Int32Array(nv);
  const up = new Uint32Array(nv),
    down = new Uint32Array(nv);
  let edges = 0,
    open = 0,
    nonManifold = 0,
    misoriented = 0;
  // The first bad edge as a scan by start corner finds it: the corner an edge runs from.
  let badAt = nv;
  let badKind: BadKind = "open";
  for (let u = 0; u < nv; u++) {
    const s = start[u]!,
      e = start[u + 1]!;
    const stamp = u + 1;
    for (let i = s; i < e; i++) {
      const w = row[i]!,
        v = w >>> 1;
      if (mark[v] !== stamp) {
        mark[v] = stamp;
        up[v] = 0;
        down[v] = 0;
      }
      if (w & 1) down[v]!++;
      else up[v]!++;
    }
    for (let i = s; i < e; i++) {
      const v = row[i]! >>> 1;
      if (mark[v] !== stamp) continue; // tallied already
      mark[v] = -stamp;
      edges++;
      const f = up[v]!,
        b = down[v]!,
        total = f + b;
      let kind: BadKind | null = null;
      if (total === 1) {
        open++;
        kind = "open";
      } else if (total > 2) {
        nonManifold++;
        kind = "non_manifold";
      } else if (f !== 1) {
        misoriented++;
        kind = "misoriented";
      }
      if (kind) {
        const from = f > 0 ? u : v;
        if (from < badAt) {
          badAt = from;
          badKind = kind;
        }
      }
    }
  }
  const p = m.positions;
  const firstBad =
    badAt < nv ? { kind: badKind, at: [p[3 * badAt]!, p[3 * badAt + 1]!, p[3 * badAt + 2]!] as [number, number, number] } : undefined;
  return { edges, open, nonManifold, misoriented, degenerate, firstBad };
}

/** One connected body: its triangles (indices into the mesh), bounds, signed volume and surface area. */
export type Body = {
  tris: Uint32Array;
  min: [number, number, number];
  max: [number, number, number];
  volume: number;
  /** mm² of surface. */
  area: number;
  /** Its corners (welded vertex indices), each once. */
  verts: Uint32Array;
};

/**
 * Split into connected bodies (triangles that share a welded corner belong together): union-find
 * over the corners, bodies numbered in order of their first triangle, triangles grouped by a counting
 * sort; volume and area summed per triangle, bounds per corner, each in one pass. `facing`, when
 * given, gets each triangle's side seen from above: 1 up, −1 down, 0 edge-on (twice its shadow's
 * signed area beyond ±1e-10 mm²).
 */
export function connectedBodies(m: WeldedStl, facing?: Int8Array): Body[] {
  const nv = m.positions.length / 3;
  const n = m.triangles;
  const t = m.tris;
  const p = m.positions;
  const parent = new Int32Array(nv);
  for (let i = 0; i < nv; i++) parent[i] = i;
  const find = (x: number) => {
    while (parent[x] !== x) {
      const g = parent[parent[x]!]!;
      parent[x] = g;
      x = g;
    }
    return x;
  };
  for (let i = 0; i < 3 * n; i += 3) {
    let a = find(t[i]!),
      b = find(t[i + 1]!);
    if (a !== b) {
      if (a < b) parent[b] = a;
      else {
        parent[a] = b;
        a = b;
      }
    }
    b = find(t[i + 2]!);
    if (a !== b) {
      if (a < b) parent[b] = a;
      else parent[a] = b;
    }
  }
  const bodyOfRoot = new Int32Array(nv).fill(-1);
  const bodyOfTri = new Int32Array(n);
  let bodies = 0;
  for (let i = 0; i < n; i++) {
    const r = find(t[3 * i]!);
    let b = bodyOfRoot[r]!;
    if (b < 0) b = bodyOfRoot[r] = bodies++;
    bodyOfTri[i] = b;
  }
  const counts = new Uint32Array(bodies + 1);
  const vol = new Float64Array(bodies),
    area = new Float64Array(bodies);
  for (let i = 0; i < n; i++) {
    const b = bodyOfTri[i]!;
    counts[b + 1]!++;
    const a3 = 3 * t[3 * i]!,
      b3 = 3 * t[3 * i + 1]!,
      c3 = 3 * t[3 * i + 2]!;
    const ax = p[a3]!,
      ay = p[a3 + 1]!,
      az = p[a3 + 2]!;
    const bx = p[b3]!,
      by = p[b3 + 1]!,
      bz = p[b3 + 2]!;
    const cx = p[c3]!,
      cy = p[c3 + 1]!,
      cz = p[c3 + 2]!;
    // Signed volume of the tetrahedron from the origin (divergence theorem), summed.
    vol[b]! += ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx);
    const ux = bx - ax,
      uy = by - ay,
      uz = bz - az,
      wx = cx - ax,
      wy = cy - ay,
      wz = cz - az;
    const nx = uy * wz - uz * wy,
      ny = uz * wx - ux * wz,
      nz = ux * wy - uy * wx;
    area[b]! += Math.sqrt(nx * nx + ny * ny + nz * nz);
    if (facing) facing[i] = nz > 1e-10 ? 1 : nz < -1e-10 ? -1 : 0;
  }
  for (let b = 0; b < bodies; b++) counts[b + 1]! += counts[b]!;
  const order = new Uint32Array(n);
  const fill = counts.slice(0, bodies);
  for (let i = 0; i < n; i++) order[fill[bodyOfTri[i]!]!++] = i;
  // Bounds from the corners: every welded corner is a corner of some triangle.
  const box = new Float64Array(6 * bodies);
  for (let b = 0; b < bodies; b++) box.fill(Infinity, 6 * b, 6 * b + 3).fill(-Infinity, 6 * b + 3, 6 * b + 6);
  for (let v = 0; v < nv; v++) {
    const r = find(v);
    parent[v] = r; // every corner straight under its root from here on
    const o = 6 * bodyOfRoot[r]!;
    const x = p[3 * v]!,
      y = p[3 * v + 1]!,
      z = p[3 * v + 2]!;
    if (x < box[o]!) box[o] = x;
    if (y < box[o + 1]!) box[o + 1] = y;
    if (z < box[o + 2]!) box[o + 2] = z;
    if (x > box[o + 3]!) box[o + 3] = x;
    if (y > box[o + 4]!) box[o + 4] = y;
    if (z > box[o + 5]!) box[o + 5] = z;
  }
  // Corners grouped by body, by a counting sort as the triangles are.
  const vstart = new Uint32Array(bodies + 1);
  for (let v = 0; v < nv; v++) vstart[bodyOfRoot[parent[v]!]! + 1]!++;
  for (let b = 0; b < bodies; b++) vstart[b + 1]! += vstart[b]!;
  const vorder = new Uint32Array(nv);
  const vfill = vstart.slice(0, bodies);
  for (let v = 0; v < nv; v++) vorder[vfill[bodyOfRoot[parent[v]!]!]!++] = v;
  const out: Body[] = [];
  for (let b = 0; b < bodies; b++) {
    const o = 6 * b;
    out.push({
      tris: order.subarray(counts[b]!, counts[b + 1]!),
      min: [box[o]!, box[o + 1]!, box[o + 2]!],
      max: [box[o + 3]!, box[o + 4]!, box[o + 5]!],
      volume: vol[b]! / 6,
      area: area[b]! / 2,
      verts: vorder.subarray(vstart[b]!, vstart[b + 1]!),
    });
  }
  return out;
}

/**
 * The generalized winding number of a closed triangle set about a point: the triangles' signed solid
 * angles (Van Oosterom & Strackee, "The Solid Angle of a Plane Triangle", IEEE Trans. Biomed. Eng.
 * 30(2), 1983: tan(Ω/2) = a·(b×c) / (|a||b||c| + (a·b)|c| + (a·c)|b| + (b·c)|a|)) summed over 4π.
 * 1 inside a closed outward-facing surface, 0 outside, whatever its shape.
 */
export function windingNumber(m: WeldedStl, tris: Uint32Array, x: number, y: number, z: number): number {
  const p = m.positions,
    t = m.tris;
  let sum = 0;
  for (let i = 0; i < tris.length; i++) {
    const k = 3 * tris[i]!;
    const a = 3 * t[k]!,
      b = 3 * t[k + 1]!,
      c = 3 * t[k + 2]!;
    const ax = p[a]! - x,
      ay = p[a + 1]! - y,
      az = p[a + 2]! - z;
    const bx = p[b]! - x,
      by = p[b + 1]! - y,
      bz = p[b + 2]! - z;
    const cx = p[c]! - x,
      cy = p[c + 1]! - y,
      cz = p[c + 2]! - z;
    const la = Math.hypot(ax, ay, az),
      lb = Math.hypot(bx, by, bz),
      lc = Math.hypot(cx, cy, cz);
    const num = ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx);
    const den = la * lb * lc + (ax * bx + ay * by + az * bz) * lc + (ax * cx + ay * cy + az * cz) * lb + (bx * cx + by * cy + bz * cz) * la;
    sum += 2 * Math.atan2(num, den);
  }
  return sum / (4 * Math.PI);
}

/**
 * The hollows: each inside-out body (negative volume) that lies strictly inside a body of positive
 * volume (its box strictly within that body's box, one of its corners enclosed by it), mapped to the
 * smallest such body. Its negative volume is then right: it is the inner wall of a hollow part.
 * Only looked for among at most `most` bodies (the pairs grow as their square).
 */
export function hollows(m: WeldedStl, bodies: Body[], most = 4096): Map<Body, Body> {
  const out = new Map<Body, Body>();
  // A file of more bodies than that is no plate (the bodies rule says so): no pairs are tried.
  if (bodies.length > most) return out;
  const solids = bodies.filter((b) => b.volume > 0).sort((a, b) => a.volume - b.volume);
  for (const v of bodies) {
    if (!(v.volume < 0)) continue;
    const corner = 3 * v.verts[0]!;
    const x = m.positions[corner]!,
      y = m.positions[corner + 1]!,
      z = m.positions[corner + 2]!;
    for (const s of solids) {
      if (s.volume <= -v.volume) continue;
      if (!(
        s.min[0] < v.min[0] &&
        s.min[1] < v.min[1] &&
        s.min[2] < v.min[2] &&
        v.max[0] < s.max[0] &&
        v.max[1] < s.max[1] &&
        v.max[2] < s.max[2]
      ))
        continue;
      if (windingNumber(m, s.tris, x, y, z) > 0.5) {
        out.set(v, s);
        break;
      }
    }
  }
  return out;
}
