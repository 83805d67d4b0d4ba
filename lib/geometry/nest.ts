import type { CrossSection } from "manifold-3d";
import type { Kernel, Scope } from "./kernel";
import type { Box } from "./plate-context";

/**
 * Nesting shapes on the bed by their outlines: each item is one or more convex parts (its packing
 * shape, already grown by half the spacing, so shapes that touch keep the spacing), which may take
 * one of several turns. Items go one at a time; for each turn the places it may take are the room
 * less the no-fit polygons of everything placed so far (the Minkowski sum of a placed part and the
 * turned part mirrored through its reference point: J. Art, "An approach to the two-dimensional
 * irregular cutting stock problem", IBM 1966; Bennell & Oliveira, "The geometry of nesting problems:
 * a tutorial", EJOR 2008). The union and difference of those polygons are the kernel's own
 * (manifold's CrossSection, Clipper2 inside); the places tried are the corners of what is left, and
 * the goal picks among them. Deterministic: the same items in the same order give the same places.
 */
export type Pt = [number, number];
/** A convex polygon, counter-clockwise, no repeated point. */
export type Convex = Pt[];

/** One turn of an item: its convex parts about its reference point, and their extent. */
export type Orientation = { angle: number; parts: Convex[]; box: Box; points: Pt[]; side?: number; turn?: number };

export type NestItem = {
  key: number;
  /**
   * Turns to try (the first is kept for a fixed item). Items made alike may share these objects:
   * their no-fit polygons are then worked out once.
   */
  orientations: Orientation[];
  /** A fixed item (a hand-placed piece): its reference point, in its first turn. */
  at?: Pt;
  /**
   * How the item chooses among its places: `goal` (the nest's goal), `low` (lowest, then leftmost:
   * a band at the bottom), `above` (lowest above everything placed, then leftmost: a band at the top).
   */
  rule?: "goal" | "low" | "above";
};

/**
 * What the nest aims for: `strip`, each item as low as it will go (its top lowest, then its left
 * edge leftmost) in a strip `width` wide from the room's left edge, the bottom-left fill of strip
 * packing (B. S. Baker, E. G. Coffman, R. L. Rivest, "Orthogonal packings in two dimensions", SIAM J.
 * Comput. 1980; for shapes, Burke et al., "A new bottom-left-fill heuristic algorithm for the
 * two-dimensional irregular packing problem", Operations Research 2006); `circle`, each item as
 * close to `centre` as it will go (its farthest point nearest), so the whole fits a small circle.
 * A strip `across` is the same turned a quarter: `width` is its height from the room's bottom, and
 * items go as far left as they will (their right edge leftmost, then their bottom lowest).
 */
export type NestGoal = { kind: "strip"; width: number; across?: boolean } | { kind: "circle"; centre: Pt };

export type NestPlace = { key: number; orientation: number; x: number; y: number };

const EPS = 1e-7;

const cross = (o: Pt, a: Pt, b: Pt) => (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);

/**
 * Andrew's monotone chain, counter-clockwise. Points within 1 nm of the one before (in the sort)
 * are one point; only exactly collinear points are dropped (a tolerance on the turn would drop a
 * real corner next to a very short edge).
 */
export function convexHullOf(points: Pt[]): Convex {
  const sorted = [...points].sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  const p: Pt[] = [];
  for (const q of sorted) {
    const last = p[p.length - 1];
    if (!last || Math.abs(q[0] - last[0]) > 1e-9 || Math.abs(q[1] - last[1]) > 1e-9) p.push(q);
  }
  if (p.length < 3) return p;
  const lower: Pt[] = [];
  for (const q of p) {
    while (lower.length >= 2 && cross(lower[lower.length - 2]!, lower[lower.length - 1]!, q) <= 0) lower.pop();
    lower.push(q);
  }
  const upper: Pt[] = [];
  for (let i = p.length - 1; i >= 0; i--) {
    const q = p[i]!;
    while (upper.length >= 2 && cross(upper[upper.length - 2]!, upper[upper.length - 1]!, q) <= 0) upper.pop();
    upper.push(q);
  }
  return [...lower.slice(0, -1), ...upper.slice(0, -1)];
}

/** Start a convex polygon at its lowest (then leftmost) point. */
function fromBottom(c: Convex): Convex {
  let k = 0;
  for (let i = 1; i < c.length; i++) if (c[i]![1] < c[k]![1] || (c[i]![1] === c[k]![1] && c[i]![0] < c[k]![0])) k = i;
  return [...c.slice(k), ...c.slice(0, k)];
}

/**
 * The Minkowski sum of two convex polygons: from the sum of their lowest points, both polygons'
 * edges in order of direction: O((n + m) log(n + m)) (de Berg et al., "Computational Geometry",
 * 3rd ed., §13.3, which merges the two already sorted lists; sorting them together is the same
 * walk and stays right when rounding leaves an edge a hair out of order).
 */
export function minkowskiConvex(a: Convex, b: Convex): Convex {
  if (a.length < 3 || b.length < 3) return convexHullOf(a.flatMap((p) => b.map((q): Pt => [p[0] + q[0], p[1] + q[1]])));
  const P = fromBottom(a),
    Q = fromBottom(b);
  const edges: { dx: number; dy: number; t: number }[] = [];
  for (const poly of [P, Q]) {
    // From the lowest point a convex polygon's edges turn one way through a full circle: each
    // direction is taken at or past the one before (an edge a rounding error below the horizontal
    // reads as its turn's end or start, by where it comes).
    let prev = -Infinity;
    for (let i = 0; i < poly.length; i++) {
      const u = poly[i]!,
        v = poly[(i + 1) % poly.length]!;
      const dx = v[0] - u[0],
        dy = v[1] - u[1];
      if (dx === 0 && dy === 0) continue;
      let t = Math.atan2(dy, dx);
      if (t < 0) t += 2 * Math.PI;
      if (prev === -Infinity && t > Math.PI) t -= 2 * Math.PI;
      if (t < prev - 1e-9) t += 2 * Math.PI;
      t = Math.max(t, prev);
      prev = t;
      edges.push({ dx, dy, t });
    }
  }
  edges.sort((e, f) => e.t - f.t);
  let x = P[0]![0] + Q[0]![0],
    y = P[0]![1] + Q[0]![1];
  const out: Pt[] = [[x, y]];
  for (const e of edges) {
    x += e.dx;
    y += e.dy;
    out.push([x, y]);
  }
  return convexHullOf(out);
}

const mirrored = (c: Convex): Convex => c.map(([x, y]): Pt => [-x, -y]);

/** Turn points about the origin by `deg`. */
export function turned(points: Pt[], deg: number): Pt[] {
  const r = (deg * Math.PI) / 180,
    c = Math.cos(r),
    s = Math.sin(r);
  return points.map(([x, y]): Pt => [c * x - s * y, s * x + c * y]);
}

export function boxOfPoints(points: Pt[]): Box {
  let minX = Infinity,
    minY = Infinity,
    maxX = -Infinity,
    maxY = -Infinity;
  for (const [x, y] of points) {
    if (x < minX) minX = x;
    if (x > maxX) maxX = x;
    if (y < minY) minY = y;
    if (y > maxY) maxY = y;
  }
  return { minX, minY, maxX, maxY };
}

/** An orientation from convex parts (the box and points are worked out). */
export function orientation(angle: number, parts: Convex[]): Orientation {
  const points = parts.flat();
  return { angle, parts, box: boxOfPoints(points), points };
}

export function convexArea(c: Convex): number {
  let s = 0;
  for (let i = 0, j = c.length - 1; i < c.length; j = i++) s += (c[j]![0] + c[i]![0]) * (c[j]![1] - c[i]![1]);
  return -s / 2;
}

type Placed = { item: NestItem; o: Orientation; x: number; y: number };

/**
 * No-fit polygons relative to the placed item's reference point, by the pair of orientations: one
 * map may serve several nests of the same items (they share their Orientation objects).
 */
export type NfpCache = Map<Orientation, Map<Orientation, Convex[]>>;

/**
 * Nest the items in the order given (fixed ones first wherever they are in the list), each where
 * its rule puts it inside `room`. Null when some item has no place in the room in any turn (with
 * `partial`, such items are left out and the rest placed), or when `stop` says so of the extent so far.
 */
export function nest(
  kernel: Kernel,
  scope: Scope,
  items: NestItem[],
  room: Box,
  goal: NestGoal,
  stop?: (extent: Box) => boolean,
  partial = false,
  nfps: NfpCache = new Map(),
): NestPlace[] | null {
  const placed: Placed[] = [];
  const out: NestPlace[] = [];
  const nfpOf = (fixed: Orientation, moving: Orientation): Convex[] => {
    let row = nfps.get(fixed);
    if (!row) nfps.set(fixed, (row = new Map()));
    let got = row.get(moving);
    if (!got) {
      got = [];
      for (const a of fixed.parts) for (const b of moving.parts) got.push(minkowskiConvex(a, mirrored(b)));
      row.set(moving, got);
    }
    return got;
  };
  // Each turn's free places so far, kept between the items that share it and brought up to date
  // with only what was placed since: the region shrinks as the room fills.
  const regions = new Map<Orientation, FreeRegion>();
  let extent: Box | null = null;
  const add = (item: NestItem, oi: number, x: number, y: number) => {
    const o = item.orientations[oi]!;
    placed.push({ item, o, x, y });
    out.push({ key: item.key, orientation: oi, x, y });
    const b = { minX: x + o.box.minX, minY: y + o.box.minY, maxX: x + o.box.maxX, maxY: y + o.box.maxY };
    extent = extent
      ? {
          minX: Math.min(extent.minX, b.minX),
          minY: Math.min(extent.minY, b.minY),
          maxX: Math.max(extent.maxX, b.maxX),
          maxY: Math.max(extent.maxY, b.maxY),
        }
      : b;
  };
  try {
    for (const it of items) if (it.at) add(it, 0, it.at[0], it.at[1]);
    for (const item of items) {
      if (item.at) continue;
      const rule = item.rule ?? "goal";
      let best: { oi: number; x: number; y: number; r: [number, number] } | null = null;
      item.orientations.forEach((o, oi) => {
        // Where the reference point may go with the whole turned shape in the room.
        const strip = rule === "goal" && goal.kind === "strip" ? goal : null;
        const right = strip && !strip.across ? Math.min(room.maxX, room.minX + strip.width) : room.maxX;
        const top = strip?.across ? Math.min(room.maxY, room.minY + strip.width) : room.maxY;
        const ifp: Box = { minX: room.minX - o.box.minX, minY: room.minY - o.box.minY, maxX: right - o.box.maxX, maxY: top - o.box.maxY };
        const ext = extent as Box | null;
        if (rule === "above" && ext) ifp.minY = Math.max(ifp.minY, ext.maxY - o.box.minY);
        if (ifp.maxX < ifp.minX - EPS || ifp.maxY < ifp.minY - EPS) return;
        // The place the goal would like best, regardless of the others: each edge's nearest point to it is tried too.
        const want: Pt =
          rule === "goal" && goal.kind === "circle"
            ? [goal.centre[0] - (o.box.minX + o.box.maxX) / 2, goal.centre[1] - (o.box.minY + o.box.maxY) / 2]
            : [ifp.minX, ifp.minY];
        // A band's region is its own (its rule narrows the room); a shared turn's is kept.
        let region = rule === "goal" ? regions.get(o) : undefined;
        if (!region) {
          region = new FreeRegion(kernel, scope, ifp, o);
          if (rule === "goal") regions.set(o, region);
        }
        for (const [x, y] of region.candidates(placed, nfpOf, want)) {
          const r = rate(goal, rule, o, x, y);
          if (!best || better(r, x, y, best)) best = { oi, x, y, r };
        }
        if (rule !== "goal") region.close();
      });
      if (!best) {
        if (partial) continue; // left for another plate
        return null;
      }
      const b = best as { oi: number; x: number; y: number };
      add(item, b.oi, b.x, b.y);
      // The extent only grows: a caller with a better nest in hand may give this one up early.
      if (stop?.(extent!)) return null;
    }
    return out;
  } finally {
    for (const r of regions.values()) r.close();
  }
}

const close = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));
/** Lexicographic: the rating's two terms, then lowest, then leftmost. */
function better(r: [number, number], x: number, y: number, best: { x: number; y: number; r: [number, number] }): boolean {
  if (!close(r[0], best.r[0])) return r[0] < best.r[0];
  if (!close(r[1], best.r[1])) return r[1] < best.r[1];
  if (Math.abs(y - best.y) > 1e-6) return y < best.y;
  return x < best.x - 1e-6;
}

/**
 * Lower is better, in two terms: for a circle, how far the item's farthest point lies from the
 * centre; else (a strip, a band) how high its top reaches, then how far left its left edge lies
 * (across: how far right its right edge reaches, then how low its bottom lies).
 */
function rate(goal: NestGoal, rule: "goal" | "low" | "above", o: Orientation, x: number, y: number): [number, number] {
  if (rule === "goal" && goal.kind === "circle") {
    let far = 0;
    for (const [px, py] of o.points) far = Math.max(far, Math.hypot(px + x - goal.centre[0], py + y - goal.centre[1]));
    return [far, 0];
  }
  if (rule === "goal" && goal.kind === "strip" && goal.across) return [x + o.box.maxX, y + o.box.minY];
  return [y + o.box.maxY, x + o.box.minX];
}

/**
 * The places one turn's reference point may take: the rectangle `ifp` less the no-fit polygon of
 * everything placed, kept as a kernel cross-section and narrowed by each newly placed item's
 * polygons when next asked. Its corners, and each edge's nearest point to the wanted place, are
 * the candidates.
 */
class FreeRegion {
  private free: CrossSection | null = null;
  private upTo = 0;
  private contours: Pt[][] = [];
  private readonly rect: Pt[];
  constructor(
    private readonly kernel: Kernel,
    private readonly scope: Scope,
    private readonly ifp: Box,
    private readonly o: Orientation,
  ) {
    // A rectangle of no width (the item as wide as the room): a sliver the kernel would drop, so kept
    // a hair wide and its points put back on the line.
    const e = ifp.maxX - ifp.minX < 1e-4 || ifp.maxY - ifp.minY < 1e-4 ? 1e-4 : 0;
    this.rect = [
      [ifp.minX - e, ifp.minY - e],
      [ifp.maxX + e, ifp.minY - e],
      [ifp.maxX + e, ifp.maxY + e],
      [ifp.minX - e, ifp.maxY + e],
    ];
  }

  candidates(placed: Placed[], nfpOf: (fixed: Orientation, moving: Orientation) => Convex[], want: Pt): Pt[] {
    const { ifp, o } = this;
    const clampIn = ([x, y]: Pt): Pt => [Math.min(ifp.maxX, Math.max(ifp.minX, x)), Math.min(ifp.maxY, Math.max(ifp.minY, y))];
    if (this.upTo < placed.length) {
      const polys: Pt[][] = [];
      for (let k = this.upTo; k < placed.length; k++) {
        const p = placed[k]!;
        // Skip what cannot reach the rectangle (the no-fit polygon's box: the placed box less the moving one).
        if (
          p.x + p.o.box.minX - o.box.maxX > ifp.maxX + EPS ||
          p.x + p.o.box.maxX - o.box.minX < ifp.minX - EPS ||
          p.y + p.o.box.minY - o.box.maxY > ifp.maxY + EPS ||
          p.y + p.o.box.maxY - o.box.minY < ifp.minY - EPS
        ) {
          continue;
        }
        for (const c of nfpOf(p.o, o)) polys.push(c.map(([x, y]): Pt => [x + p.x, y + p.y]));
      }
      this.upTo = placed.length;
      if (polys.length) {
        const { CrossSection } = this.kernel.wasm;
        const scope = this.scope;
        const before = this.free ?? scope.track(new CrossSection([this.rect]));
        const taken = scope.track(new CrossSection(polys, "Positive"));
        const after = scope.track(before.subtract(taken));
        scope.drop(taken);
        scope.drop(before);
        this.free = after;
        this.contours = after.toPolygons() as Pt[][];
      }
    }
    if (!this.free) return [...this.rect.map(clampIn), clampIn(want)];
    const pts: Pt[] = [];
    for (const c of this.contours) {
      for (let i = 0; i < c.length; i++) {
        const a = c[i]!;
        pts.push(clampIn(a));
        // The point of this edge nearest the wanted place (on the region's boundary, so free).
        const b = c[(i + 1) % c.length]!;
        const dx = b[0] - a[0],
          dy = b[1] - a[1];
        const len2 = dx * dx + dy * dy;
        if (len2 < 1e-12) continue;
        const t = ((want[0] - a[0]) * dx + (want[1] - a[1]) * dy) / len2;
        if (t > 0 && t < 1) pts.push(clampIn([a[0] + t * dx, a[1] + t * dy]));
      }
    }
    // The wanted place itself, when it is free: inside the region (even-odd over its contours).
    if (this.contours.length && insideContours(this.contours, want)) pts.push(clampIn(want));
    return pts;
  }

  close(): void {
    if (this.free) this.scope.drop(this.free);
    this.free = null;
  }
}

/** Whether a point lies inside contours taken together by the even-odd rule (outer ones and their holes). */
function insideContours(contours: Pt[][], [px, py]: Pt): boolean {
  let inside = false;
  for (const c of contours) {
    for (let i = 0, j = c.length - 1; i < c.length; j = i++) {
      const [xi, yi] = c[i]!,
        [xj, yj] = c[j]!;
      if (yi > py !== yj > py && px < ((xj - xi) * (py - yi)) / (yj - yi) + xi) inside = !inside;
    }
  }
  return inside;
}
