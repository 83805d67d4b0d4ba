/**
 * An indexed triangle mesh in the kernel's own layout (manifold's `Mesh`): three floats per vertex,
 * three vertex indices per triangle, counter-clockwise seen from outside.
 */
export type IndexedMesh = {
  vertProperties: Float32Array;
  triVerts: Uint32Array;
};

export type Bounds = { min: [number, number, number]; max: [number, number, number] };

export function triangleCount(mesh: IndexedMesh): number {
  return mesh.triVerts.length / 3;
}

export function bounds(mesh: IndexedMesh): Bounds {
  const p = mesh.vertProperties;
  const min: [number, number, number] = [Infinity, Infinity, Infinity];
  const max: [number, number, number] = [-Infinity, -Infinity, -Infinity];
  for (let i = 0; i < p.length; i += 3) {
    for (let a = 0; a < 3; a++) {
      const v = p[i + a]!;
      if (v < min[a]!) min[a] = v;
      if (v > max[a]!) max[a] = v;
    }
  }
  return { min, max };
}

/** Signed volume by the divergence theorem (sum of signed tetrahedra to the origin); negative = inside out. */
export function signedVolume(mesh: IndexedMesh): number {
  const p = mesh.vertProperties;
  const t = mesh.triVerts;
  let six = 0;
  for (let i = 0; i < t.length; i += 3) {
    const a = t[i]! * 3;
    const b = t[i + 1]! * 3;
    const c = t[i + 2]! * 3;
    const ax = p[a]!,
      ay = p[a + 1]!,
      az = p[a + 2]!;
    const bx = p[b]!,
      by = p[b + 1]!,
      bz = p[b + 2]!;
    const cx = p[c]!,
      cy = p[c + 1]!,
      cz = p[c + 2]!;
    six += ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx);
  }
  return six / 6;
}

/**
 * Watertightness as a printer needs it: every directed edge appears once and its reverse once
 * (each edge shared by exactly two triangles with opposite orientation). Returns the count of bad edges.
 */
export function openOrMisorientedEdges(mesh: IndexedMesh): number {
  const t = mesh.triVerts;
  const directed = new Map<string, number>();
  for (let i = 0; i < t.length; i += 3) {
    for (let e = 0; e < 3; e++) {
      const a = t[i + e]!;
      const b = t[i + ((e + 1) % 3)]!;
      const k = `${a},${b}`;
      directed.set(k, (directed.get(k) ?? 0) + 1);
    }
  }
  let bad = 0;
  for (const [k, n] of directed) {
    const [a, b] = k.split(",");
    if (n !== 1 || directed.get(`${b},${a}`) !== 1) bad++;
  }
  return bad;
}

/** Several meshes as one (vertex lists appended, indices shifted): a part made of several bodies. */
export function combineMeshes(meshes: IndexedMesh[]): IndexedMesh {
  if (meshes.length === 1) return meshes[0]!;
  const nv = meshes.reduce((s, m) => s + m.vertProperties.length, 0);
  const nt = meshes.reduce((s, m) => s + m.triVerts.length, 0);
  const v = new Float32Array(nv),
    t = new Uint32Array(nt);
  let vo = 0,
    to = 0;
  for (const m of meshes) {
    v.set(m.vertProperties, vo);
    for (let i = 0; i < m.triVerts.length; i++) t[to + i] = m.triVerts[i]! + vo / 3;
    vo += m.vertProperties.length;
    to += m.triVerts.length;
  }
  return { vertProperties: v, triVerts: t };
}

/**
 * The winding number of a closed mesh about a point: ≈ 1 inside an outward-facing shell, 0 outside
 * (−1 inside an inside-out one). The sum of the triangles' signed solid angles over 4π, each by
 * A. Van Oosterom and J. Strackee, "The solid angle of a plane triangle", IEEE Trans. Biomed. Eng.
 * BME-30(2), 1983: tan(Ω/2) = a·(b×c) / (|a||b||c| + (a·b)|c| + (a·c)|b| + (b·c)|a|).
 */
export function windingNumber(mesh: IndexedMesh, x: number, y: number, z: number): number {
  const p = mesh.vertProperties;
  const t = mesh.triVerts;
  let sum = 0;
  for (let i = 0; i < t.length; i += 3) {
    const a = t[i]! * 3,
      b = t[i + 1]! * 3,
      c = t[i + 2]! * 3;
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
    const det = ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx);
    const den = la * lb * lc + (ax * bx + ay * by + az * bz) * lc + (ax * cx + ay * cy + az * cz) * lb + (bx * cx + by * cy + bz * cz) * la;
    sum += 2 * Math.atan2(det, den);
  }
  return sum / (4 * Math.PI);
}
