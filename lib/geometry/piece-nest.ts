import { quickDecomp } from "poly-decomp-es";
import { NUMBER_GAP, type Bands } from "./mark-bands";
import {
  convexArea,
  convexHullOf,
  nest,
  orientation,
  turned,
  type Convex,
  type NestPlace,
  type NfpCache,
  type NestItem,
  type Orientation,
  type Pt,
} from "./nest";
import type { SlabOptions } from "./options";
import type { PieceRoom } from "./piece-layout";
import type { NestCache, Piece } from "./pieces";
import type { Box, PlateContext } from "./plate-context";
import { SHAPE_RULES } from "./slab";
import { grownHull, NUMBER_SIDES, numberSpot, ringHullAt } from "./hug";

/** Turns tried for a piece about the vertical axis: this step from its best packing angle (a part is never mirrored). */
export const TURN_STEP = 15;
/** A shadow at least this share of its convex hull nests as its hull (one convex part). */
const CONVEX_ENOUGH = 0.95;
/** More convex parts than this and the shape nests as its hull. */
const MOST_PARTS = 12;

type PartShape = { parts: Convex[]; hull: Pt[]; period: number };

/** The smallest turn (a multiple of the step, dividing 360°) that maps the convex shape onto itself, within `tol` mm. */
function periodOf(hull: Convex, tol: number): number {
  let a = 0,
    cx = 0,
    cy = 0;
  for (let i = 0, j = hull.length - 1; i < hull.length; j = i++) {
    const f = hull[j]![0] * hull[i]![1] - hull[i]![0] * hull[j]![1];
    a += f;
    cx += (hull[j]![0] + hull[i]![0]) * f;
    cy += (hull[j]![1] + hull[i]![1]) * f;
  }
  if (Math.abs(a) < 1e-9) return 360;
  cx /= 3 * a;
  cy /= 3 * a;
  const n = 72;
  const support = Array.from({ length: n }, (_, k) => {
    const d = (k * 2 * Math.PI) / n;
    let s = -Infinity;
    for (const [x, y] of hull) s = Math.max(s, Math.cos(d) * (x - cx) + Math.sin(d) * (y - cy));
    return s;
  });
  for (let t = TURN_STEP; t < 360; t += TURN_STEP) {
    if (360 % t) continue;
    const shift = (t / 360) * n;
    if (support.every((s, k) => Math.abs(s - support[(k + shift) % n]!) <= tol)) return t;
  }
  return 360;
}

/**
 * A part's packing shape at no turn: its shadow grown by the ring's reach and half the spacing, as
 * convex parts (one, its hull, for a shape near enough convex), and how often it repeats as it turns.
 */
function partShape(ctx: PlateContext, p: Piece, grow: number): PartShape {
  const { scope } = ctx;
  const hull = p.fp.hull as Pt[];
  const hullArea = convexArea(convexHullOf(hull));
  const size = Math.max(...hull.map((q) => Math.hypot(q[0], q[1])));
  if (p.fp.shadowArea >= CONVEX_ENOUGH * hullArea) {
    const g = grownHull(hull, grow);
    return { parts: [g], hull: g, period: periodOf(g, Math.max(0.25, 0.01 * size)) };
  }
  // The shadow grown (round), simplified within 0.05 mm, split into convex parts, each grown by that
  // 0.05 mm again so the parts hold the whole grown shadow.
  const grownShadow = scope.track(scope.track(p.fp.shadow.offset(grow, "Round", 2, 32)).simplify(0.05));
  const parts: Convex[] = [];
  for (const c of grownShadow.toPolygons()) {
    const ring = c.map(([x, y]) => [x, y] as [number, number]);
    if (signed(ring) <= 0) continue; // a hole in the grown shadow: filled, never used
    const split = quickDecomp(ring) || [];
    if (!split.length || split.length > MOST_PARTS) return { parts: [grownHull(hull, grow)], hull: grownHull(hull, grow), period: 360 };
    for (const piece of split) parts.push(grownHull(piece as Pt[], 0.06, 8));
  }
  if (!parts.length || parts.length > MOST_PARTS) {
    const g = grownHull(hull, grow);
    return { parts: [g], hull: g, period: 360 };
  }
  return { parts, hull: grownHull(hull, grow), period: 360 };
}

function signed(c: Pt[]): number {
  let s = 0;
  for (let i = 0, j = c.length - 1; i < c.length; j = i++) s += (c[j]![0] - c[i]![0]) * (c[j]![1] + c[i]![1]);
  return s / 2;
}

const rect = (b: Box): Convex => [
  [b.minX, b.minY],
  [b.maxX, b.minY],
  [b.maxX, b.maxY],
  [b.minX, b.maxY],
];

/** The piece's turns: its packing parts turned, and its number's room beside the ring, grown by half the spacing. */
function pieceOrientations(shape: PartShape, p: Piece, room: PieceRoom, half: number, numbers: boolean, sides: number): Orientation[] {
  const turns = Math.max(1, Math.round(shape.period / TURN_STEP));
  const out: Orientation[] = [];
  for (let k = 0; k < turns; k++) {
    const angle = (((p.angle + k * TURN_STEP) % 360) + 360) % 360;
    const parts = shape.parts.map((c) => turned(c, angle));
    if (!numbers) {
      out.push({ ...orientation(angle, parts), turn: k });
      continue;
    }
    // The number's room on each side it may take (one turn each), reaching to the ring so the parts join.
    const ring = ringHullAt(p.fp.hull as Pt[], angle, room.ext);
    const w = room.gutter - NUMBER_GAP;
    for (let side = 0; side < sides; side++) {
      const spot = numberSpot(ring, room.numberRow, NUMBER_GAP, w, side);
      const left = side % 2 === 0;
      const box = {
        minX: spot.minX - half - (left ? 0 : NUMBER_GAP),
        minY: spot.rowBottom - half,
        maxX: spot.minX + w + half + (left ? NUMBER_GAP : 0),
        maxY: spot.rowTop + half,
      };
      out.push({ ...orientation(angle, [...parts, rect(box)]), side, turn: k });
    }
  }
  return out;
}

/** The free search (every piece in any turn) only where the pieces' turns number no more than this. */
const FREE_TURNS_AT_MOST = 240;

/** Share of a strip the packing shapes fill, for choosing its width (common practice for nested sheets, from memory). */
const EXPECTED_FILL = 0.82;

/**
 * Bottom-left fill in a strip as wide as a square of the items' area would be (at the fill
 * expected), and, for a kit small enough, in strips a little narrower and wider; the layout whose
 * extent scores least for the slab's shape wins. A strip too narrow for the bed's depth widens to
 * the room. Deterministic: the widths tried depend only on the items.
 */
function stripNest(ctx: PlateContext, ordered: NestItem[], room: Box, loose: NestItem[], half: number): NestPlace[] | null {
  const o = ctx.options;
  const area = loose.reduce((s, it) => s + convexArea(convexHullOf(it.orientations[0]!.points)), 0);
  // Each item lying as low as it will (its least height): the strip is at least as wide as the widest of them so.
  const flat = (it: NestItem) => {
    const low = it.orientations.reduce((a, q) => (q.box.maxY - q.box.minY < a.box.maxY - a.box.minY - 1e-9 ? q : a));
    return low.box.maxX - low.box.minX;
  };
  const widest = Math.max(0, ...loose.map(flat));
  const roomW = room.maxX - room.minX;
  const w0 = Math.min(roomW, Math.max(widest, Math.sqrt(area / EXPECTED_FILL)));
  const few = loose.length <= 30;
  // The square's width, a little less and more, and two or three of the widest item side by side
  // (bars in two columns) where that is near the square.
  const widths = few ? [w0, w0 * 1.2] : [w0];
  for (const k of [2, 3]) {
    const w = k * widest + 1e-6;
    if (few && w >= 0.7 * w0 && w <= 1.5 * w0 && widths.every((x) => Math.abs(x - w) > 1)) widths.push(w);
  }
  const score = SHAPE_RULES[o.slab.shape].packingScore;
  const grow = o.slab.margin - half;
  let best: { placed: NestPlace[]; score: number } | null = null;
  const nfps: NfpCache = new Map();
  const stop = (e: Box) => best !== null && score(e.maxX - e.minX + 2 * grow, e.maxY - e.minY + 2 * grow) >= best.score;
  // Turns tried: every piece of a part in one turn, its first, a twelfth (30°) or a quarter (90°)
  // on, so copies line up in the rows or columns they interlock in (pointed hexagons in rows, flat
  // ones in columns); then each piece free to take any (the costly search, in one width, given up as
  // soon as it cannot beat the best so far).
  const turnsInAll = loose.reduce((n, it) => n + it.orientations.length, 0);
  const variants: { only: number | null; widths: number[] }[] = [
    ...[0, 2, 6].map((k) => ({ only: k, widths })),
    ...(turnsInAll <= FREE_TURNS_AT_MOST ? [{ only: null, widths: [w0] }] : []),
  ];
  const tried: NestItem[][] = [];
  for (const { only, widths: ws } of variants) {
    const items = only === null ? ordered : ordered.map((it) => onlyTurn(it, only));
    // The same turns as a variant tried already (every part repeats by then): nothing new to find.
    if (tried.some((t) => t.every((it, i) => it.orientations === items[i]!.orientations))) continue;
    tried.push(items);
    // Filled upwards in strips of each width, and filled rightwards in bands of each height.
    for (const across of [false, true]) {
      const span = across ? room.maxY - room.minY : roomW;
      for (const w of ws.map((x) => Math.min(span, Math.max(across ? tallest(loose) : widest, x)))) {
        const placed = nest(ctx.kernel, ctx.scope, items, room, { kind: "strip", width: w, across }, stop, false, nfps);
        if (!placed) continue;
        const sc = extentScore(placed, items, score, grow);
        if (process.env.NEST_DEBUG) console.log(only, across ? "across" : "strip", w.toFixed(1), "score", sc.toFixed(0));
        if (!best || sc < best.score - 1e-9) best = { placed: backTo(placed, items, ordered), score: sc };
      }
    }
  }
  if (best) return best.placed;
  return w0 < roomW ? nest(ctx.kernel, ctx.scope, ordered, room, { kind: "strip", width: roomW }) : null;
}

/**
 * The item with only its turns of index `k` and k + a half turn (every side of its number), or its
 * first turn where it has no turn k; a fixed item or a band as it is.
 */
const turnCache = new WeakMap<Orientation[], Map<number, Orientation[]>>();
function onlyTurn(it: NestItem, k: number): NestItem {
  if (it.at || it.rule) return it;
  let byK = turnCache.get(it.orientations);
  if (!byK) turnCache.set(it.orientations, (byK = new Map()));
  let os = byK.get(k);
  // Its turn k and the half turn from it: copies of an L lie head to tail, a pair interlocking.
  const half = 180 / TURN_STEP;
  const pick = (j: number) => it.orientations.filter((q) => q.turn === j || q.turn === j + half);
  // A part that repeats before turn k (a hexagon has no 90°: it is its 30°) keeps its first turn.
  if (!os) byK.set(k, (os = pick(k).length ? pick(k) : pick(0)));
  return os.length && os.length < it.orientations.length ? { ...it, orientations: os } : it;
}

/** Places found with some items' turns narrowed, their turns numbered as in the full items again. */
function backTo(placed: NestPlace[], used: NestItem[], full: NestItem[]): NestPlace[] {
  const usedBy = new Map(used.map((it) => [it.key, it]));
  const fullBy = new Map(full.map((it) => [it.key, it]));
  return placed.map((pl) => {
    const q = usedBy.get(pl.key)!.orientations[pl.orientation]!;
    return { ...pl, orientation: fullBy.get(pl.key)!.orientations.indexOf(q) };
  });
}

/** The tallest of the items standing as narrow as they will (their least width). */
function tallest(items: NestItem[]): number {
  return Math.max(
    0,
    ...items.map((it) => {
      const thin = it.orientations.reduce((a, q) => (q.box.maxX - q.box.minX < a.box.maxX - a.box.minX - 1e-9 ? q : a));
      return thin.box.maxY - thin.box.minY;
    }),
  );
}

/** The score of the slab round the placed shapes: their extent grown by what the margin adds past them. */
function extentScore(placed: NestPlace[], items: NestItem[], score: (w: number, h: number) => number, grow: number): number {
  const byKey = new Map(items.map((it) => [it.key, it]));
  let minX = Infinity,
    minY = Infinity,
    maxX = -Infinity,
    maxY = -Infinity;
  for (const pl of placed) {
    const b = byKey.get(pl.key)!.orientations[pl.orientation]!.box;
    minX = Math.min(minX, pl.x + b.minX);
    minY = Math.min(minY, pl.y + b.minY);
    maxX = Math.max(maxX, pl.x + b.maxX);
    maxY = Math.max(maxY, pl.y + b.maxY);
  }
  return score(maxX - minX + 2 * grow, maxY - minY + 2 * grow);
}

/** Where the nest put the bands (their lower left corners), when they were nested. */
export type BandsAt = { bottom?: Pt; top?: Pt };

/**
 * Nest the pieces (and the mark bands) by their true shapes on the bed, as placePieces does by
 * boxes: hand-placed pieces stay; the bottom band goes low, the top band above the pieces; the rest
 * nest for the slab's shape (the least rectangle, or the smallest circle for a disc). Sets each
 * nested piece's angle, x and y. Null when some piece finds no place on the bed.
 */
export function nestPieces(
  ctx: PlateContext,
  pieces: Piece[],
  room: PieceRoom,
  bands: Bands,
  cache?: NestCache,
): { bandsAt: BandsAt } | null {
  const o: SlabOptions = ctx.options;
  const key = cache ? nestKey(o, pieces, room, bands) : "";
  const hit = cache?.get(key);
  if (hit) {
    hit.pieces.forEach(([angle, x, y, side], i) => Object.assign(pieces[i]!, { angle, x, y, numberSide: side }));
    return { bandsAt: hit.bandsAt };
  }
  const found = nestAnew(ctx, pieces, room, bands);
  if (found && found.slots.length < pieces.length) return null;
  if (found && cache) {
    cache.set(key, { pieces: pieces.map((p) => [p.angle, p.x, p.y, p.numberSide ?? 0]), bandsAt: found.bandsAt });
    while (cache.size > NESTS_KEPT) cache.delete(cache.keys().next().value!);
  }
  return found;
}
const NESTS_KEPT = 8;

/**
 * Exactly what shapes a nest: each piece's outline and first turn, the room round pieces, the bands,
 * the bed and the options that place them.
 */
function nestKey(o: SlabOptions, pieces: Piece[], room: PieceRoom, bands: Bands): string {
  const r3 = (x: number) => Math.round(x * 1e6) / 1e6;
  return JSON.stringify([
    pieces.map((p) => [p.partIndex, p.angle, p.fp.shadowArea, p.fp.hull.length, ...p.fp.hull.flat().map(r3)]),
    room,
    [bands.bottom.w, bands.bottom.h, bands.top.w, bands.top.h],
    [o.slab.shape, o.slab.margin, o.layout.bed, o.layout.placements ?? [], o.marks.numbers],
  ]);
}

/**
 * As many of the pieces as the bed holds, largest first, each where it fits (the bed filled from
 * its bottom left): the slots placed, for one plate of a kit split over several (plans.ts). The
 * bands take their places on every plate.
 */
export function fillBed(ctx: PlateContext, pieces: Piece[], room: PieceRoom, bands: Bands): number[] {
  const placed = nestAnew(ctx, pieces, room, bands, true);
  return placed ? placed.slots : [];
}

function nestAnew(
  ctx: PlateContext,
  pieces: Piece[],
  room: PieceRoom,
  bands: Bands,
  partial = false,
): { bandsAt: BandsAt; slots: number[] } | null {
  const o: SlabOptions = ctx.options;
  const m = o.slab.margin;
  const half = room.spacing / 2;
  const grow = room.ext + half + 0.01;
  const numbers = o.marks.numbers;
  const fixed = new Map((o.layout.placements ?? []).map((pl) => [pl.piece, pl]));
  const shapes = new Map<number, PartShape>();
  const orients = new Map<number, Orientation[]>();
  const items: NestItem[] = [];
  const area = new Map<number, number>();
  for (const p of pieces) {
    let shape = shapes.get(p.partIndex);
    if (!shape) shapes.set(p.partIndex, (shape = partShape(ctx, p, grow)));
    const at = fixed.get(p.slot);
    if (at) {
      p.angle = at.rotation;
      const [one] = pieceOrientations({ ...shape, period: TURN_STEP }, p, room, half, numbers, 1);
      items.push({ key: p.slot, orientations: [one!], at: [at.x, at.y] });
      continue;
    }
    // Copies of one part share their turns (and so their no-fit polygons).
    let os = orients.get(p.partIndex);
    if (!os) orients.set(p.partIndex, (os = pieceOrientations(shape, p, room, half, numbers, NUMBER_SIDES)));
    items.push({ key: p.slot, orientations: os });
    area.set(p.slot, convexArea(shape.hull));
  }
  const bandItem = (key: number, w: number, h: number, rule: NestItem["rule"]): NestItem => ({
    key,
    orientations: [orientation(0, [rect({ minX: -half, minY: -half, maxX: w + half, maxY: h + half })])],
    rule,
  });
  const disc = o.slab.shape === "disc";
  const bottom = bands.bottom.h ? bandItem(-1, bands.bottom.w, bands.bottom.h, disc ? "goal" : "low") : null;
  const top = bands.top.h ? bandItem(-2, bands.top.w, bands.top.h, disc ? "goal" : "above") : null;
  const loose = items.filter((it) => !it.at).sort((a, b) => area.get(b.key)! - area.get(a.key)! || a.key - b.key);
  const ordered = [
    ...items.filter((it) => it.at),
    ...(bottom ? [bottom] : []),
    ...(disc && top ? [top] : []),
    ...loose,
    ...(!disc && top ? [top] : []),
  ];
  const bed: Box = { minX: m - half, minY: m - half, maxX: o.layout.bed.width - m + half, maxY: o.layout.bed.depth - m + half };
  const centre: Pt = [(bed.minX + bed.maxX) / 2, (bed.minY + bed.maxY) / 2];
  const placed = partial
    ? nest(
        ctx.kernel,
        ctx.scope,
        ordered,
        bed,
        disc ? { kind: "circle", centre } : { kind: "strip", width: bed.maxX - bed.minX },
        undefined,
        true,
      )
    : disc
      ? nest(ctx.kernel, ctx.scope, ordered, bed, { kind: "circle", centre })
      : stripNest(ctx, ordered, bed, [...(bottom ? [bottom] : []), ...loose, ...(top ? [top] : [])], half);
  if (!placed) return null;
  // A band that found no place leaves the bed to no piece: nothing fits this plate.
  if (partial && ((bottom && !placed.some((pl) => pl.key === -1)) || (top && !placed.some((pl) => pl.key === -2)))) return null;
  const bandsAt: BandsAt = {};
  const bySlot = new Map(pieces.map((p) => [p.slot, p]));
  const itemOf = new Map(items.map((it) => [it.key, it]));
  for (const pl of placed) {
    if (pl.key === -1) bandsAt.bottom = [pl.x, pl.y];
    else if (pl.key === -2) bandsAt.top = [pl.x, pl.y];
    else {
      const p = bySlot.get(pl.key)!;
      const it = itemOf.get(pl.key)!;
      const turn = it.orientations[pl.orientation]!;
      p.angle = turn.angle;
      p.numberSide = turn.side ?? 0;
      p.x = pl.x;
      p.y = pl.y;
    }
  }
  return { bandsAt, slots: placed.filter((pl) => pl.key > 0).map((pl) => pl.key) };
}
