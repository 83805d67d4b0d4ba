import quickhull from "quickhull3d/dist/quickhull3d.js";

/**
 * Does a part fit the small-parts cylinder of US 16 CFR 1501 "in any orientation" (16 CFR 1501.4(b)(1):
 * placed without compressing it; if it fits entirely within the cylinder in any orientation, it fails)?
 *
 * The fixture (16 CFR 1501.4, Figure 1) is a cylinder 1.25 in across whose floor slopes from 1.00 in
 * deep on one side to 2.25 in on the other. Its English dimensions are used, as 16 CFR 1501.4(a)
 * says they are for compliance (the figure's 31.7 and 57.1 mm are rounded and a little smaller).
 *
 * The fixture is convex, so a part fits exactly when its convex hull does. For one orientation the
 * test is exact geometry (below); over orientations it is a branch-and-bound search of rotation space
 * with a proof for every region it discards, so a part that fits is never reported as not fitting.
 */
export const SMALL_PARTS_CYLINDER = { diameter: 1.25 * 25.4, shallow: 1.0 * 25.4, deep: 2.25 * 25.4 } as const;

const R = SMALL_PARTS_CYLINDER.diameter / 2;
/** Depth of the floor on the cylinder's axis; the floor is the plane h = A + B·x. */
const A = (SMALL_PARTS_CYLINDER.shallow + SMALL_PARTS_CYLINDER.deep) / 2;
/** The floor's slope (1.25 in of fall over 1.25 in across: exactly 1, a 45° floor). */
const B = (SMALL_PARTS_CYLINDER.deep - SMALL_PARTS_CYLINDER.shallow) / SMALL_PARTS_CYLINDER.diameter;
/** Length of the floor's normal (1, 0, −B)·… per unit of h − B·x. */
const S = Math.hypot(1, B);
/** How far the disc's centre may move toward the deep side per mm the fixture is grown (top and floor each grow by that mm). */
const K = (1 + S) / B;

/**
 * The longest straight segment inside the fixture: from the rim on the shallow side to the floor's
 * deepest point, √(diameter² + deep²) (a top point and a floor point at angles α, β are
 * 2R²(1 − cos(α − β)) + (A + B·R·cos β)² apart squared: largest at α = β + π, β = 0).
 */
export const CYLINDER_LONGEST = Math.hypot(SMALL_PARTS_CYLINDER.diameter, SMALL_PARTS_CYLINDER.deep);

/**
 * Where a part fits: fixture point = rotation · (vertex − center) + offset, in the fixture's frame
 * x (across, toward the deep side), y (across), h (depth below the rim, downward). Inside means
 * x² + y² ≤ R², 0 ≤ h ≤ A + B·x. (That frame is mirrored, but the fixture is symmetric in y, so
 * searching rotations in it misses nothing.)
 */
export type CylinderPlacement = { rotation: number[]; center: [number, number, number]; offset: [number, number, number] };

export type CylinderFit =
  /** A placement with every vertex inside the fixture. */
  | ({ verdict: "fits"; evaluations: number } & CylinderPlacement)
  /**
   * Not proven either way: some orientation puts it within `within` mm of fitting (the fixture grown
   * by that much holds it), or the search ran out of its budget (`within` null). Treated as fitting.
   */
  | { verdict: "may_fit"; within: number | null; evaluations: number }
  /** Proven not to fit: longer than the longest segment inside, wider than the cylinder every way, or every orientation excluded. */
  | { verdict: "does_not_fit"; reason: "too_long" | "too_wide" | "excluded"; evaluations: number };

export type CylinderSearchOptions = {
  /** Orientation cells are split until a point moves at most this far (mm) across one (default 0.15). */
  resolution?: number;
  /** Most point evaluations to spend (default 2 million: about 0.3 s on a busy 2-core machine); past it the answer is "may fit". */
  budget?: number;
};

/** Tolerance for float rounding (mm): far below anything that prints, far above double rounding. */
const TOL = 1e-6;
/** Grid steps of the coarse point sets the search uses, as fractions of ρ; the finest set is every vertex. */
const GRID = [1 / 4, 1 / 16, 1 / 64];

type PointSet = { x: Float64Array; y: Float64Array; z: Float64Array; n: number; order: Uint32Array; delta: number; faces?: number[][][] };

/**
 * `positions`: the part's vertices, x y z after one another (an IndexedMesh's vertProperties); the
 * hull of the vertices is the hull of the part.
 */
export function smallPartsFit(positions: ArrayLike<number>, options: CylinderSearchOptions = {}): CylinderFit {
  const resolution = options.resolution ?? 0.15;
  const budget = options.budget ?? 2e6;
  const n = Math.floor(positions.length / 3);
  if (n === 0) return { verdict: "does_not_fit", reason: "excluded", evaluations: 0 };
  const lo = [Infinity, Infinity, Infinity],
    hi = [-Infinity, -Infinity, -Infinity];
  for (let i = 0; i < n; i++) {
    for (let a = 0; a < 3; a++) {
      const v = positions[i * 3 + a]!;
      if (v < lo[a]!) lo[a] = v;
      if (v > hi[a]!) hi[a] = v;
    }
  }
  const center: [number, number, number] = [(lo[0]! + hi[0]!) / 2, (lo[1]! + hi[1]!) / 2, (lo[2]! + hi[2]!) / 2];
  const size = [hi[0]! - lo[0]!, hi[1]! - lo[1]!, hi[2]! - lo[2]!];
  const search = new Search(budget);

  // A part at least as long as its longest bounding-box side cannot lie on any segment inside.
  if (Math.max(...size) > CYLINDER_LONGEST + TOL) return { verdict: "does_not_fit", reason: "too_long", evaluations: 0 };

  // The bounding box holds the part: if the box fits standing on one of its faces, so does the part.
  const corners = pointSet(
    [0, 1, 2, 3, 4, 5, 6, 7].flatMap((c) => [
      (c & 1 ? 0.5 : -0.5) * size[0]!,
      (c & 2 ? 0.5 : -0.5) * size[1]!,
      (c & 4 ? 0.5 : -0.5) * size[2]!,
    ]),
    0,
  );
  for (const m of AXIS_TURNS) {
    const e = search.test(m, corners, 0);
    if (e.fits) return search.found(m, center, e);
  }

  // ρ: how far any vertex lies from the centre we turn about (the box centre); a turn by angle θ moves it at most 2ρ·sin(θ/2).
  let rho = 0;
  for (let i = 0; i < n; i++)
    rho = Math.max(rho, Math.hypot(positions[i * 3]! - center[0], positions[i * 3 + 1]! - center[1], positions[i * 3 + 2]! - center[2]));
  const sets = new LazySets(positions, n, center, rho);
  // Its kept vertices are points of the part: two of them farther apart than the longest segment inside rule it out.
  const span = farthest(sets.get(0));
  if (span.length > CYLINDER_LONGEST + TOL) return { verdict: "does_not_fit", reason: "too_long", evaluations: search.spent };
  // A ball wider than the cylinder inside the kept points' hull (so inside the part's): the part is
  // wider than 31.75 mm in every direction, and nothing inside the cylinder is wider than that across it.
  if (insideBall(sets.get(0)) > R + TOL) return { verdict: "does_not_fit", reason: "too_wide", evaluations: search.spent };
  return search.run(sets, rho, center, resolution, span.axis);
}

/**
 * Every rotation is a unit quaternion q ~ −q. Take q's largest component k (made positive) and divide
 * by it: the other three, u, lie in [−1, 1]³. So four cubes (k = 0…3) cover all rotations, and a cell of
 * a cube (centre u₀, half-side s) is bounded: for u in it, |u − u₀| ≤ s√3 =: d, and since the
 * unnormalised (1, u) is at least 1 long, the angle α between the two unit quaternions has
 * sin α ≤ d (and α < 90° for d ≤ 1). The rotations then differ by 2α, which moves a point at distance
 * ≤ ρ from the turning centre by at most 2ρ·sin α ≤ 2ρ·s√3 =: η (the cell's reach).
 *
 * Proof step: if some rotation in the cell placed the part inside the fixture F, then at the cell's
 * centre every point is within η of F, so inside F grown by η — which is contained in F_η, the fixture
 * with its radius, rim and floor each moved out by η. A cell whose centre does not fit F_η is dropped.
 * The same holds for any subset of the part's vertices (a coarser point set), so cells are tested
 * with coarse sets first. A centre whose points fit F_−δ (shrunk by δ, δ = how far any vertex lies from
 * the point set) proves the part fits. Cells neither dropped nor proven are split in eight, down to a
 * reach of `resolution`; one still open there is within η + δ of fitting: "may fit".
 */
type Cell = { face: number; u: [number, number, number]; s: number; key: number; reach: number; m: number[] };

class Search {
  spent = 0;
  private px = new Float64Array(0);
  private py = new Float64Array(0);
  constructor(private budget: number) {}

  /** Fit of a point set turned by `m` (3×3, row-major), in the fixture grown by `grow` mm (negative: shrunk). */
  test(m: ArrayLike<number>, p: PointSet, grow: number): Eval {
    const n = p.n;
    if (this.px.length < n) {
      this.px = new Float64Array(n);
      this.py = new Float64Array(n);
    }
    const px = this.px,
      py = this.py;
    let hMin = Infinity,
      floorMax = -Infinity;
    const m0 = m[0]!,
      m1 = m[1]!,
      m2 = m[2]!,
      m3 = m[3]!,
      m4 = m[4]!,
      m5 = m[5]!,
      m6 = m[6]!,
      m7 = m[7]!,
      m8 = m[8]!;
    for (let i = 0; i < n; i++) {
      const x = p.x[i]!,
        y = p.y[i]!,
        z = p.z[i]!;
      const X = m0 * x + m1 * y + m2 * z;
      const h = m6 * x + m7 * y + m8 * z;
      px[i] = X;
      py[i] = m3 * x + m4 * y + m5 * z;
      if (h < hMin) hMin = h;
      if (h - B * X > floorMax) floorMax = h - B * X;
    }
    this.spent += n + 32; // (32: the test's own overhead, which counts for small point sets)
    // Rim h + t ≥ −g and floor h + t − B(x + tx) ≤ A + g·S leave a depth t exactly when
    // B·tx ≥ floorMax − hMin − A − g(1 + S). With the disc's centre c = −(tx, ty) in the part's frame:
    // c.x ≤ X, and every point within R + g of c.
    const X = (A + hMin - floorMax) / B + K * grow;
    const disc = minDisc(px, py, n, p.order);
    this.spent += 2 * n;
    let c: [number, number] = [disc.cx, disc.cy];
    let r = disc.r,
      rLow = disc.r;
    if (disc.cx > X + TOL && disc.r <= R + grow + TOL) {
      // The best centre is on the line c.x = X (the radius needed is convex in c, its free minimum lies beyond).
      const line = onLine(px, py, n, X, p.order);
      this.spent += 2 * n;
      c = [X, line.y];
      r = line.r;
      rLow = line.r;
    }
    return { fits: r <= R + grow + TOL, excess: r - (R + grow), excessLow: rLow - (R + grow), c, hMin, floorMax, grow };
  }

  found(m: ArrayLike<number>, center: [number, number, number], e: Eval): CylinderFit {
    // Depth: halfway between the rim and the floor's limit (the test left room between them).
    const g = e.grow;
    const tx = -e.c[0],
      ty = -e.c[1];
    const tLow = -g - e.hMin,
      tHigh = A + g * S + B * tx - e.floorMax;
    return { verdict: "fits", rotation: Array.from(m), center, offset: [tx, ty, (tLow + tHigh) / 2], evaluations: this.spent };
  }

  run(sets: LazySets, rho: number, center: [number, number, number], resolution: number, longAxis: [number, number, number]): CylinderFit {
    const heap = new CellHeap();
    const reachOf = (s: number) => 2 * rho * s * Math.sqrt(3);
    /** A cell made: dropped (null), proven to hold a fit, or kept with its centre's excess as its key. */
    const make = (face: number, u: [number, number, number], s: number): Cell | { fit: CylinderFit } | null => {
      const reach = reachOf(s);
      const m = rotationOf(face, u);
      const p = sets.forReach(reach);
      // Drop: not even the fixture grown by the cell's reach holds the centre's points.
      if (this.test(m, p, reach).excessLow > TOL) return null;
      const shrunk = this.test(m, p, -p.delta);
      if (shrunk.fits) return { fit: this.found(m, center, shrunk) };
      return { face, u, s, reach, key: shrunk.excess, m };
    };
    // Local refinement from the most promising starts: a fitting orientation is usually found here.
    // Long parts first with their longest span along the fixture's longest segment (rim to deepest
    // floor), turned about it in steps; then (below) the best cells of a first grid.
    const diagonal = [SMALL_PARTS_CYLINDER.diameter / CYLINDER_LONGEST, 0, SMALL_PARTS_CYLINDER.deep / CYLINDER_LONGEST];
    const onto = turnOnto(longAxis, diagonal);
    for (let k = 0; k < 12; k++) {
      const hit = this.polish(matMul(turnOf(diagonal.map((v) => (v * k * Math.PI) / 6)), onto), sets, 0.05);
      if (hit) return hit;
    }
    const s0 = 1 / 4; // s0·√3 < 1, as the bound needs
    for (let face = 0; face < 4; face++) {
      for (let i = 0; i < 4; i++)
        for (let j = 0; j < 4; j++)
          for (let k = 0; k < 4; k++) {
            const c = make(face, [-1 + (2 * i + 1) * s0, -1 + (2 * j + 1) * s0, -1 + (2 * k + 1) * s0], s0);
            if (c && "fit" in c) return c.fit;
            if (c) heap.push(c);
          }
    }
    for (const start of heap.peekBest(6)) {
      const hit = this.polish(start.m, sets, 0.4);
      if (hit) return hit;
    }
    let deepest = s0;
    for (;;) {
      const cell = heap.pop();
      if (!cell) return { verdict: "does_not_fit", reason: "excluded", evaluations: this.spent };
      if (this.spent > this.budget) return { verdict: "may_fit", within: null, evaluations: this.spent };
      if (cell.s < deepest) {
        // The best cell of a new, finer level: refine locally from it too.
        deepest = cell.s;
        const hit = this.polish(cell.m, sets, 2 * Math.asin(Math.min(1, cell.s * Math.sqrt(3))));
        if (hit) return hit;
      }
      if (cell.reach <= resolution) {
        const hit = this.polish(cell.m, sets, 2 * Math.asin(Math.min(1, cell.s * Math.sqrt(3))));
        if (hit) return hit;
        return { verdict: "may_fit", within: cell.reach + sets.forReach(cell.reach).delta, evaluations: this.spent };
      }
      const h = cell.s / 2;
      for (let c = 0; c < 8; c++) {
        const child = make(cell.face, [cell.u[0] + (c & 1 ? h : -h), cell.u[1] + (c & 2 ? h : -h), cell.u[2] + (c & 4 ? h : -h)], h);
        if (child && "fit" in child) return child.fit;
        if (child) heap.push(child);
      }
    }
  }

  /**
   * Local refinement: a pattern search over small turns about the fixture's axes, halving the step,
   * on a mid-fine point set and then, when that ends close, on the finest; each in the fixture shrunk
   * by the set's δ, so what it finds is a proven fit.
   */
  private polish(start: number[], sets: LazySets, step: number): CylinderFit | null {
    const mid = sets.get(GRID.length - 1);
    const first = this.descend(start, mid, step, 1e-3);
    if (first.e.fits) return this.found(first.m, sets.center, first.e);
    if (first.e.excess > 3 * mid.delta) return null;
    const fine = sets.finest();
    const second = this.descend(first.m, fine, (4 * mid.delta) / Math.max(1, sets.rho), 1e-5);
    return second.e.fits ? this.found(second.m, sets.center, second.e) : null;
  }

  /** Nelder–Mead over a small turn ω (a rotation vector applied in the fixture's frame) from `start`. */
  private descend(start: number[], p: PointSet, step: number, minStep: number): { m: number[]; e: Eval } {
    const at = (w: number[]) => {
      const m = matMul(turnOf(w), start);
      return { w, m, e: this.test(m, p, -p.delta) };
    };
    let simplex = [at([0, 0, 0]), at([step, 0, 0]), at([0, step, 0]), at([0, 0, step])];
    const mix = (a: number[], b: number[], t: number) => a.map((v, i) => v + t * (b[i]! - v));
    for (let iter = 0; iter < 150 && this.spent <= this.budget; iter++) {
      simplex.sort((x, y) => x.e.excess - y.e.excess);
      const best = simplex[0]!;
      if (best.e.fits) break;
      const size = Math.max(...simplex.slice(1).map((v) => Math.hypot(...v.w.map((c, i) => c - best.w[i]!))));
      if (size < minStep) break;
      const worst = simplex[3]!;
      const centroid = [0, 1, 2].map((i) => (simplex[0]!.w[i]! + simplex[1]!.w[i]! + simplex[2]!.w[i]!) / 3);
      const reflected = at(mix(centroid, worst.w, -1));
      if (reflected.e.excess < best.e.excess) {
        const expanded = at(mix(centroid, worst.w, -2));
        simplex[3] = expanded.e.excess < reflected.e.excess ? expanded : reflected;
      } else if (reflected.e.excess < simplex[2]!.e.excess) {
        simplex[3] = reflected;
      } else {
        const contracted = at(mix(centroid, worst.w, 0.5));
        if (contracted.e.excess < worst.e.excess) simplex[3] = contracted;
        else simplex = simplex.map((v, i) => (i === 0 ? v : at(mix(best.w, v.w, 0.5))));
      }
    }
    simplex.sort((x, y) => x.e.excess - y.e.excess);
    return { m: simplex[0]!.m, e: simplex[0]!.e };
  }
}

type Eval = { fits: boolean; excess: number; excessLow: number; c: [number, number]; hMin: number; floorMax: number; grow: number };

/** Smallest disc around the points (Welzl's incremental algorithm over a fixed shuffled order). */
function minDisc(px: Float64Array, py: Float64Array, n: number, order: Uint32Array): { cx: number; cy: number; r: number } {
  let cx = px[order[0]!]!,
    cy = py[order[0]!]!,
    r2 = 0;
  for (let a = 1; a < n; a++) {
    const i = order[a]!;
    if ((px[i]! - cx) ** 2 + (py[i]! - cy) ** 2 <= r2 + 1e-12) continue;
    cx = px[i]!;
    cy = py[i]!;
    r2 = 0;
    for (let b = 0; b < a; b++) {
      const j = order[b]!;
      if ((px[j]! - cx) ** 2 + (py[j]! - cy) ** 2 <= r2 + 1e-12) continue;
      cx = (px[i]! + px[j]!) / 2;
      cy = (py[i]! + py[j]!) / 2;
      r2 = (px[i]! - cx) ** 2 + (py[i]! - cy) ** 2;
      for (let c = 0; c < b; c++) {
        const k = order[c]!;
        if ((px[k]! - cx) ** 2 + (py[k]! - cy) ** 2 <= r2 + 1e-12) continue;
        const circ = circumcircle(px[i]!, py[i]!, px[j]!, py[j]!, px[k]!, py[k]!);
        cx = circ[0];
        cy = circ[1];
        r2 = circ[2];
      }
    }
  }
  return { cx, cy, r: Math.sqrt(r2) };
}

function circumcircle(ax: number, ay: number, bx: number, by: number, cx: number, cy: number): [number, number, number] {
  const d = 2 * (ax * (by - cy) + bx * (cy - ay) + cx * (ay - by));
  if (Math.abs(d) < 1e-12) {
    // Collinear: the disc on the farthest pair.
    const pairs: [number, number, number, number][] = [
      [ax, ay, bx, by],
      [ax, ay, cx, cy],
      [bx, by, cx, cy],
    ];
    let best: [number, number, number] = [ax, ay, 0];
    for (const [x1, y1, x2, y2] of pairs) {
      const r2 = ((x1 - x2) ** 2 + (y1 - y2) ** 2) / 4;
      if (r2 > best[2]) best = [(x1 + x2) / 2, (y1 + y2) / 2, r2];
    }
    return best;
  }
  const a2 = ax * ax + ay * ay,
    b2 = bx * bx + by * by,
    c2 = cx * cx + cy * cy;
  const ux = (a2 * (by - cy) + b2 * (cy - ay) + c2 * (ay - by)) / d;
  const uy = (a2 * (cx - bx) + b2 * (ax - cx) + c2 * (bx - ax)) / d;
  const r2 = Math.max((ax - ux) ** 2 + (ay - uy) ** 2, (bx - ux) ** 2 + (by - uy) ** 2, (cx - ux) ** 2 + (cy - uy) ** 2);
  return [ux, uy, r2];
}

/**
 * The smallest disc around the points with its centre on the line x = X: Welzl's incremental scheme
 * with one free coordinate (y), so at most two points fix it — one (the centre level with it) or two
 * (the centre equidistant from both). Expected linear time over the shuffled order; exact.
 */
function onLine(px: Float64Array, py: Float64Array, n: number, X: number, order: Uint32Array): { y: number; r: number } {
  const d2 = (i: number, y: number) => (X - px[i]!) ** 2 + (y - py[i]!) ** 2;
  const first = order[0]!;
  let y = py[first]!,
    r2 = d2(first, y);
  for (let a = 1; a < n; a++) {
    const i = order[a]!;
    if (d2(i, y) <= r2 + 1e-12) continue;
    y = py[i]!;
    r2 = d2(i, y);
    for (let b = 0; b < a; b++) {
      const j = order[b]!;
      if (d2(j, y) <= r2 + 1e-12) continue;
      // (X − xi)² + (y − yi)² = (X − xj)² + (y − yj)², solved for y (yi ≠ yj, or j would lie inside).
      const dy = py[j]! - py[i]!;
      y = Math.abs(dy) < 1e-15 ? y : ((X - px[j]!) ** 2 - (X - px[i]!) ** 2 + py[j]! ** 2 - py[i]! ** 2) / (2 * dy);
      r2 = Math.max(d2(i, y), d2(j, y));
    }
  }
  return { y, r: Math.sqrt(r2) };
}

/**
 * Point sets of the part's vertices, made when first needed: snapped to a coarse grid (one vertex kept
 * per grid cube) and reduced to their hull's vertices, then — finest — every vertex, exact (δ = 0).
 */
class LazySets {
  private sets: (PointSet | undefined)[] = [];
  constructor(
    private positions: ArrayLike<number>,
    private n: number,
    readonly center: [number, number, number],
    readonly rho: number,
  ) {}

  get(level: number): PointSet {
    let s = this.sets[level];
    if (!s) {
      s =
        level < GRID.length
          ? hullSet(this.positions, this.n, this.center, GRID[level]! * this.rho)
          : allVertices(this.positions, this.n, this.center);
      this.sets[level] = s;
    }
    return s;
  }
  /** The coarsest set whose δ (≤ its grid step·√3) is at most half the reach (every vertex when none is). */
  forReach(reach: number): PointSet {
    for (let l = 0; l < GRID.length; l++) if (GRID[l]! * this.rho * Math.sqrt(3) <= reach / 2) return this.get(l);
    return this.finest();
  }
  finest(): PointSet {
    // A coarse set that kept every vertex's place already is the finest.
    for (let l = 0; l < GRID.length; l++) if (this.sets[l]?.delta === 0) return this.sets[l]!;
    return this.get(GRID.length);
  }
}

function allVertices(positions: ArrayLike<number>, n: number, center: [number, number, number]): PointSet {
  const flat = new Array<number>(n * 3);
  for (let i = 0; i < n; i++) for (let a = 0; a < 3; a++) flat[i * 3 + a] = positions[i * 3 + a]! - center[a]!;
  return pointSet(flat, 0);
}

/**
 * One vertex per cube of a `grid`-mm lattice: every vertex lies within δ ≤ grid·√3 (one cube's
 * diagonal) of a kept one, so the part's hull lies within δ of the kept points' hull. Only the hull's own
 * vertices are kept (quickhull3d); points inside it change no disc and no depth.
 */
function hullSet(positions: ArrayLike<number>, n: number, center: [number, number, number], grid: number): PointSet {
  const kept = new Map<number, number>();
  const picked: [number, number, number][] = [];
  const span = 1 << 17; // three 17-bit cell indices stay within a double's exact integers (2^51)
  let delta = 0;
  for (let i = 0; i < n; i++) {
    const x = positions[i * 3]! - center[0],
      y = positions[i * 3 + 1]! - center[1],
      z = positions[i * 3 + 2]! - center[2];
    const key =
      (Math.floor(x / grid) + span / 2) * span * span + (Math.floor(y / grid) + span / 2) * span + (Math.floor(z / grid) + span / 2);
    const k = kept.get(key);
    if (k === undefined) {
      kept.set(key, picked.length);
      picked.push([x, y, z]);
    } else {
      // δ measured, not just bounded: how far this vertex lies from the one kept for its cube.
      const p = picked[k]!;
      delta = Math.max(delta, Math.hypot(x - p[0], y - p[1], z - p[2]));
    }
  }
  let keep: number[];
  let faces: number[][] = [];
  if (picked.length < 4) keep = picked.map((_, i) => i);
  else {
    faces = quickhull(picked);
    keep = [...new Set(faces.flat())];
  }
  const set = pointSet(
    keep.flatMap((i) => picked[i]!),
    delta,
  );
  set.faces = faces.map((f) => f.map((i) => picked[i]!));
  return set;
}

/** Radius of a ball about the hull's vertex centroid that lies inside the hull (its distance to the nearest face plane). */
function insideBall(p: PointSet): number {
  if (!p.faces?.length) return 0;
  let cx = 0,
    cy = 0,
    cz = 0;
  for (let i = 0; i < p.n; i++) {
    cx += p.x[i]!;
    cy += p.y[i]!;
    cz += p.z[i]!;
  }
  cx /= p.n;
  cy /= p.n;
  cz /= p.n;
  let r = Infinity;
  for (const f of p.faces) {
    const [a, b, c] = f as [[number, number, number], [number, number, number], [number, number, number]];
    const u = [b[0] - a[0], b[1] - a[1], b[2] - a[2]],
      v = [c[0] - a[0], c[1] - a[1], c[2] - a[2]];
    const nx = u[1]! * v[2]! - u[2]! * v[1]!,
      ny = u[2]! * v[0]! - u[0]! * v[2]!,
      nz = u[0]! * v[1]! - u[1]! * v[0]!;
    const len = Math.hypot(nx, ny, nz);
    if (len < 1e-12) continue;
    r = Math.min(r, Math.abs((cx - a[0]) * nx + (cy - a[1]) * ny + (cz - a[2]) * nz) / len);
  }
  return Number.isFinite(r) ? r : 0;
}

function pointSet(flat: number[], delta: number): PointSet {
  const n = flat.length / 3;
  const x = new Float64Array(n),
    y = new Float64Array(n),
    z = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = flat[i * 3]!;
    y[i] = flat[i * 3 + 1]!;
    z[i] = flat[i * 3 + 2]!;
  }
  // A fixed shuffle (seeded): the disc algorithm is linear on average over random orders, and repeatable.
  const order = new Uint32Array(n).map((_, i) => i);
  let seed = 0x9e3779b9;
  for (let i = n - 1; i > 0; i--) {
    seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
    const j = seed % (i + 1);
    const t = order[i]!;
    order[i] = order[j]!;
    order[j] = t;
  }
  return { x, y, z, n, order, delta };
}

/** The farthest pair of the set: its length and its direction (unit). */
function farthest(p: PointSet): { length: number; axis: [number, number, number] } {
  let d = 0,
    a = 0,
    b = 0;
  for (let i = 0; i < p.n; i++) {
    for (let j = i + 1; j < p.n; j++) {
      const e = (p.x[i]! - p.x[j]!) ** 2 + (p.y[i]! - p.y[j]!) ** 2 + (p.z[i]! - p.z[j]!) ** 2;
      if (e > d) {
        d = e;
        a = i;
        b = j;
      }
    }
  }
  const len = Math.sqrt(d) || 1;
  return { length: Math.sqrt(d), axis: [(p.x[b]! - p.x[a]!) / len, (p.y[b]! - p.y[a]!) / len, (p.z[b]! - p.z[a]!) / len] };
}

/** A turn taking unit vector a onto unit vector b (about their common normal). */
function turnOnto(a: number[], b: number[]): number[] {
  const w = [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
  const sin = Math.hypot(w[0]!, w[1]!, w[2]!),
    cos = a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
  if (sin < 1e-12) return cos > 0 ? turnOf([0, 0, 0]) : turnOf(Math.abs(a[0]!) < 0.9 ? [Math.PI, 0, 0] : [0, Math.PI, 0]);
  const angle = Math.atan2(sin, cos);
  return turnOf(w.map((v) => (v / sin) * angle));
}

function rotationOf(face: number, u: [number, number, number]): number[] {
  const q = [0, 0, 0, 0];
  let o = 0;
  for (let i = 0; i < 4; i++) q[i] = i === face ? 1 : u[o++]!;
  const len = Math.hypot(q[0]!, q[1]!, q[2]!, q[3]!);
  const [w, x, y, z] = q.map((v) => v / len) as [number, number, number, number];
  return [
    1 - 2 * (y * y + z * z),
    2 * (x * y - w * z),
    2 * (x * z + w * y),
    2 * (x * y + w * z),
    1 - 2 * (x * x + z * z),
    2 * (y * z - w * x),
    2 * (x * z - w * y),
    2 * (y * z + w * x),
    1 - 2 * (x * x + y * y),
  ];
}

/** The turn by |w| radians about w (Rodrigues' formula). */
function turnOf(w: number[]): number[] {
  const a = Math.hypot(w[0]!, w[1]!, w[2]!);
  if (a < 1e-15) return [1, 0, 0, 0, 1, 0, 0, 0, 1];
  const [x, y, z] = [w[0]! / a, w[1]! / a, w[2]! / a];
  const c = Math.cos(a),
    s = Math.sin(a),
    k = 1 - c;
  return [
    c + x * x * k,
    x * y * k - z * s,
    x * z * k + y * s,
    y * x * k + z * s,
    c + y * y * k,
    y * z * k - x * s,
    z * x * k - y * s,
    z * y * k + x * s,
    c + z * z * k,
  ];
}

function matMul(a: number[], b: number[]): number[] {
  const out = new Array<number>(9);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) out[i * 3 + j] = a[i * 3]! * b[j]! + a[i * 3 + 1]! * b[3 + j]! + a[i * 3 + 2]! * b[6 + j]!;
  return out;
}

/** The 24 turns that take the axes onto the axes (signed permutation matrices of determinant +1). */
const AXIS_TURNS: number[][] = (() => {
  const out: number[][] = [];
  const perms = [
    [0, 1, 2],
    [0, 2, 1],
    [1, 0, 2],
    [1, 2, 0],
    [2, 0, 1],
    [2, 1, 0],
  ];
  for (const p of perms) {
    for (let signs = 0; signs < 8; signs++) {
      const m = new Array<number>(9).fill(0);
      for (let r = 0; r < 3; r++) m[r * 3 + p[r]!] = signs & (1 << r) ? -1 : 1;
      const det =
        m[0]! * (m[4]! * m[8]! - m[5]! * m[7]!) - m[1]! * (m[3]! * m[8]! - m[5]! * m[6]!) + m[2]! * (m[3]! * m[7]! - m[4]! * m[6]!);
      if (det > 0) out.push(m);
    }
  }
  return out;
})();

/** Cells by key, lowest first (a binary heap). */
class CellHeap {
  private a: Cell[] = [];
  push(c: Cell) {
    const a = this.a;
    a.push(c);
    let i = a.length - 1;
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (a[p]!.key <= a[i]!.key) break;
      [a[p], a[i]] = [a[i]!, a[p]!];
      i = p;
    }
  }
  pop(): Cell | undefined {
    const a = this.a;
    if (!a.length) return undefined;
    const top = a[0]!;
    const last = a.pop()!;
    if (a.length) {
      a[0] = last;
      let i = 0;
      for (;;) {
        const l = 2 * i + 1,
          r = l + 1;
        let m = i;
        if (l < a.length && a[l]!.key < a[m]!.key) m = l;
        if (r < a.length && a[r]!.key < a[m]!.key) m = r;
        if (m === i) break;
        [a[m], a[i]] = [a[i]!, a[m]!];
        i = m;
      }
    }
    return top;
  }
  peekBest(k: number): Cell[] {
    return [...this.a].sort((x, y) => x.key - y.key).slice(0, k);
  }
}
