import type { CrossSection, Manifold } from "manifold-3d";
import type { Reliefs } from "./mark-reliefs";
import type { IndexedMesh } from "./mesh";
import { hullAt, placedShadow, type Piece } from "./pieces";
import type { Box, PlateContext } from "./plate-context";
import { grownHull } from "./hug";
import { SHAPE_RULES, type ContentPoint, type CornerFit } from "./slab";

/** The last few slab solids a process built, by a fingerprint of what shapes them (see `PartCache`). */
export type SlabCache = Map<string, { mesh: IndexedMesh; volume: number }>;
const SLAB_ENTRIES = 4;

/** Cutters reach this far (mm) above the slab's top, so no cut face lies exactly on it. */
const CUT_OVERSHOOT = 0.01;

/**
 * The slab's outline around everything on it with the margin (slab.ts), moved so the slab sits in
 * the positive quadrant from (0, 0): `dx`, `dy` is that move, for the pieces and the marks; `corners`
 * says when round corners made the slab grow or were limited.
 */
export function slabAround(
  ctx: PlateContext,
  content: { pieces: Piece[]; pieceBoxes: Box[]; glyphBoxes: Box[]; markBoxes: Box[]; ext: number },
): { outline: CrossSection; width: number; depth: number; dx: number; dy: number; corners?: CornerFit } {
  const { kernel, scope, options: o } = ctx;
  const hug = o.layout.packing === "shapes";
  const boxes = [...content.pieceBoxes, ...content.markBoxes];
  // Boxes drawn into a contour outline, and whose corners the slab must hold: by shape, only the
  // numbers and the marks (the pieces by their hulls and rings); by boxes, the pieces' boxes too.
  const rects = hug ? [...content.glyphBoxes, ...content.markBoxes] : boxes;
  const corners = (b: Box): [number, number][] => [
    [b.minX, b.minY],
    [b.maxX, b.minY],
    [b.minX, b.maxY],
    [b.maxX, b.maxY],
  ];
  // What the slab must hold with its margin: each piece's hull grown by its ring, every box's corners.
  const hulls = content.pieces.map((p) => hullAt(p));
  const points: ContentPoint[] = [
    ...hulls.flatMap((h) => h.map(([x, y]) => ({ x, y, clearance: content.ext }))),
    ...rects.flatMap((b) => corners(b).map(([x, y]) => ({ x, y, clearance: 0 }))),
  ];
  // For a circle round it all: the rings' hulls as polygons that hold them, and the boxes' corners.
  const circlePoints: [number, number][] = [...hulls.flatMap((h) => grownHull(h, content.ext)), ...rects.flatMap(corners)];
  const shaped = SHAPE_RULES[o.slab.shape].outline(kernel, scope, o, {
    boxes,
    rects,
    points,
    circlePoints,
    pieceShadows: content.pieces.map((p) => placedShadow(scope, p)),
    ext: content.ext,
  });
  const ob = shaped.outline.bounds();
  const dx = -ob.min[0],
    dy = -ob.min[1];
  return {
    outline: scope.track(shaped.outline.translate(dx, dy)),
    width: ob.max[0] - ob.min[0],
    depth: ob.max[1] - ob.min[1],
    dx,
    dy,
    ...(shaped.corners ? { corners: shaped.corners } : {}),
  };
}

/** A 2 × 32-bit hash of a stream of numbers (their float64 bits), for cache keys. */
function fingerprint(feed: (add: (x: number) => void) => void): string {
  const f = new Float64Array(1),
    u = new Uint32Array(f.buffer);
  let h1 = 0x811c9dc5,
    h2 = 0x01000193;
  feed((x) => {
    f[0] = x;
    h1 = Math.imul(h1 ^ u[0]!, 0x01000193) ^ Math.imul(h2, 31);
    h2 = Math.imul(h2 ^ u[1]!, 0x85ebca6b) + (h1 >>> 7);
  });
  return `${(h1 >>> 0).toString(16)}${(h2 >>> 0).toString(16)}`;
}

/** Exactly what shapes the slab solid: its thickness, its outline, every mark's cross-section with its relief and depth. */
function slabKey(thickness: number, outline: CrossSection, reliefs: Reliefs): string {
  return fingerprint((add) => {
    add(thickness);
    const polys = (cs: CrossSection) => {
      for (const c of cs.toPolygons()) {
        add(c.length);
        for (const [x, y] of c) {
          add(x);
          add(y);
        }
      }
    };
    polys(outline);
    for (const [tag, map] of [
      [1, reliefs.engrave],
      [2, reliefs.emboss],
    ] as const) {
      for (const [depth, list] of map) {
        add(tag);
        add(depth);
        for (const cs of list) {
          add(-1);
          polys(cs);
        }
      }
    }
  });
}

/**
 * The slab solid: the outline extruded, one n-ary difference with every engraving's cutter (one per
 * depth), then the embossed marks joined on; or, with a cache, the same slab built before.
 * `beforeBooleans` (for benchmarks) sees the slab and its cutters just before the difference.
 */
export function slabSolid(
  ctx: PlateContext,
  outline: CrossSection,
  reliefs: Reliefs,
  cache?: SlabCache,
  beforeBooleans?: (slab: Manifold, cutters: Manifold[]) => void,
): { mesh: IndexedMesh; volume: number } {
  const { scope } = ctx;
  const { Manifold, CrossSection } = ctx.kernel.wasm;
  const thickness = ctx.options.slab.thickness;
  const key = cache ? slabKey(thickness, outline, reliefs) : undefined;
  const kept = cache && key ? cache.get(key) : undefined;
  if (kept)
    return { mesh: { vertProperties: kept.mesh.vertProperties.slice(), triVerts: kept.mesh.triVerts.slice() }, volume: kept.volume };

  const base = scope.track(outline.extrude(thickness));
  const cutters: Manifold[] = [];
  for (const [depth, list] of reliefs.engrave) {
    const cs = scope.track(CrossSection.union(list));
    cutters.push(scope.track(scope.track(cs.extrude(depth + CUT_OVERSHOOT)).translate(0, 0, thickness - depth)));
  }
  beforeBooleans?.(base, cutters);
  let slab = cutters.length ? scope.track(Manifold.difference([base, ...cutters])) : base;
  const adds: Manifold[] = [];
  for (const [depth, list] of reliefs.emboss) {
    const cs = scope.track(CrossSection.union(list));
    adds.push(scope.track(scope.track(cs.extrude(depth)).translate(0, 0, thickness)));
  }
  if (adds.length) slab = scope.track(Manifold.union([slab, ...adds]));
  const mesh = toIndexed(slab.getMesh());
  const volume = slab.volume();
  if (cache && key) {
    if (cache.size >= SLAB_ENTRIES) cache.delete(cache.keys().next().value!);
    cache.set(key, { mesh: { vertProperties: mesh.vertProperties.slice(), triVerts: mesh.triVerts.slice() }, volume });
  }
  return { mesh, volume };
}

function toIndexed(mesh: { vertProperties: Float32Array; triVerts: Uint32Array; numProp: number }): IndexedMesh {
  if (mesh.numProp === 3) return { vertProperties: mesh.vertProperties.slice(), triVerts: mesh.triVerts.slice() };
  const n = mesh.vertProperties.length / mesh.numProp;
  const out = new Float32Array(n * 3);
  for (let i = 0; i < n; i++) for (let a = 0; a < 3; a++) out[i * 3 + a] = mesh.vertProperties[i * mesh.numProp + a]!;
  return { vertProperties: out, triVerts: mesh.triVerts.slice() };
}
