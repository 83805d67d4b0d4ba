import { bounds, type IndexedMesh } from "./mesh";

/** How a part stands on the bed before layout. Applied in this order: up axis, X turns, Y turns, lay flat, Z rotation. */
export type Orientation = {
  /** Files from tools that treat +Y as up: turn +Y to +Z. */
  yUp?: boolean;
  /** Quarter turns about X and Y (0–3). */
  turnX?: number;
  turnY?: number;
  /** Stand the part on its largest flat face. */
  layFlat?: boolean;
  /** Degrees about Z, any angle. */
  rotateZ?: number;
};

type M3 = [number, number, number, number, number, number, number, number, number]; // row-major

const mul = (a: M3, b: M3): M3 => {
  const r = new Array<number>(9) as M3;
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) r[i * 3 + j] = a[i * 3]! * b[j]! + a[i * 3 + 1]! * b[3 + j]! + a[i * 3 + 2]! * b[6 + j]!;
  return r;
};
const quarter = (k: number) => {
  const q = ((Math.round(k) % 4) + 4) % 4;
  return [
    [1, 0],
    [0, 1],
    [-1, 0],
    [0, -1],
  ][q] as [number, number]; // [cos, sin], exact
};
const rotX = ([c, s]: [number, number]): M3 => [1, 0, 0, 0, c, -s, 0, s, c];
const rotY = ([c, s]: [number, number]): M3 => [c, 0, s, 0, 1, 0, -s, 0, c];
const rotZ = ([c, s]: [number, number]): M3 => [c, -s, 0, s, c, 0, 0, 0, 1];
const IDENTITY: M3 = [1, 0, 0, 0, 1, 0, 0, 0, 1];

function apply(mesh: IndexedMesh, m: M3): IndexedMesh {
  const p = mesh.vertProperties;
  const out = new Float32Array(p.length);
  for (let i = 0; i < p.length; i += 3) {
    const x = p[i]!,
      y = p[i + 1]!,
      z = p[i + 2]!;
    out[i] = m[0] * x + m[1] * y + m[2] * z;
    out[i + 1] = m[3] * x + m[4] * y + m[5] * z;
    out[i + 2] = m[6] * x + m[7] * y + m[8] * z;
  }
  return { vertProperties: out, triVerts: mesh.triVerts };
}

/** Move a mesh so its lowest point is at z = 0 and its bounding box is centred on x = y = 0. */
export function dropToBed(mesh: IndexedMesh): IndexedMesh {
  const b = bounds(mesh);
  const cx = (b.min[0] + b.max[0]) / 2,
    cy = (b.min[1] + b.max[1]) / 2,
    z0 = b.min[2];
  const p = mesh.vertProperties;
  const out = new Float32Array(p.length);
  for (let i = 0; i < p.length; i += 3) {
    out[i] = p[i]! - cx;
    out[i + 1] = p[i + 1]! - cy;
    out[i + 2] = p[i + 2]! - z0;
  }
  return { vertProperties: out, triVerts: mesh.triVerts };
}

/** The rotation that turns the unit vector n to point straight down (−Z), by Rodrigues' formula. */
export function rotationToDown(n: [number, number, number]): M3 {
  const [x, y, z] = n;
  if (z < -1 + 1e-12) return IDENTITY;
  if (z > 1 - 1e-12) return rotX([-1, 0]);
  // axis = n × (0,0,-1) = (-y, x, 0), angle θ with cos θ = −z.
  const c = -z;
  const kx = -y,
    ky = x;
  const s = Math.hypot(kx, ky);
  const ux = kx / s,
    uy = ky / s;
  const t = 1 - c;
  return [t * ux * ux + c, t * ux * uy, s * uy, t * ux * uy, t * uy * uy + c, -s * ux, -s * uy, s * ux, c];
}

/**
 * The largest flat face the part can stand on: coplanar triangles are grouped by normal and plane,
 * biggest area first, and the first group that is a supporting plane (no vertex beyond it) wins.
 * Returns its outward normal, or null for a part with no flat face (a sphere).
 */
export function largestFlatFace(mesh: IndexedMesh): [number, number, number] | null {
  const p = mesh.vertProperties;
  const t = mesh.triVerts;
  type Group = { area: number; nx: number; ny: number; nz: number; d: number };
  const groups = new Map<string, Group>();
  for (let i = 0; i < t.length; i += 3) {
    const a = t[i]! * 3,
      b = t[i + 1]! * 3,
      c = t[i + 2]! * 3;
    const ux = p[b]! - p[a]!,
      uy = p[b + 1]! - p[a + 1]!,
      uz = p[b + 2]! - p[a + 2]!;
    const vx = p[c]! - p[a]!,
      vy = p[c + 1]! - p[a + 1]!,
      vz = p[c + 2]! - p[a + 2]!;
    let nx = uy * vz - uz * vy,
      ny = uz * vx - ux * vz,
      nz = ux * vy - uy * vx;
    const len = Math.hypot(nx, ny, nz);
    if (len < 1e-12) continue;
    nx /= len;
    ny /= len;
    nz /= len;
    const d = nx * p[a]! + ny * p[a + 1]! + nz * p[a + 2]!;
    const key = `${Math.round(nx * 500)},${Math.round(ny * 500)},${Math.round(nz * 500)},${Math.round(d * 20)}`;
    const g = groups.get(key);
    const area = len / 2;
    if (g) {
      g.area += area;
      g.nx += nx * area;
      g.ny += ny * area;
      g.nz += nz * area;
    } else groups.set(key, { area, nx: nx * area, ny: ny * area, nz: nz * area, d });
  }
  const sorted = [...groups.values()].sort((a, b) => b.area - a.area).slice(0, 64);
  for (const g of sorted) {
    const len = Math.hypot(g.nx, g.ny, g.nz);
    const n: [number, number, number] = [g.nx / len, g.ny / len, g.nz / len];
    let max = -Infinity;
    for (let i = 0; i < p.length; i += 3) max = Math.max(max, n[0] * p[i]! + n[1] * p[i + 1]! + n[2] * p[i + 2]!);
    if (max <= g.d + 0.02) return n;
  }
  return null;
}

/** Turn a part as asked, then drop it to the bed (lowest point at z = 0, centred on the origin). */
export function orientMesh(mesh: IndexedMesh, o: Orientation = {}): IndexedMesh {
  let m: M3 = IDENTITY;
  if (o.yUp) m = mul(rotX([0, 1]), m); // +Y → +Z
  if (o.turnX) m = mul(rotX(quarter(o.turnX)), m);
  if (o.turnY) m = mul(rotY(quarter(o.turnY)), m);
  let out = m === IDENTITY ? mesh : apply(mesh, m);
  if (o.layFlat) {
    const n = largestFlatFace(out);
    if (n) out = apply(out, rotationToDown(n));
  }
  if (o.rotateZ) {
    const r = (o.rotateZ * Math.PI) / 180;
    out = apply(out, rotZ([Math.cos(r), Math.sin(r)]));
  }
  return dropToBed(out);
}
