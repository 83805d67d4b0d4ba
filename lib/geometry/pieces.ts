import type { CrossSection } from "manifold-3d";
import type { CheckInput } from "./checks";
import { bestPackingAngle, measureFootprint, rotatedBounds, type PartFootprint } from "./footprint";
import type { Kernel, Scope } from "./kernel";
import type { NumberGlyphs } from "./mark-bands";
import type { Contour } from "./marks/text";
import type { IndexedMesh } from "./mesh";
import type { SlabOptions } from "./options";
import type { Box, PlateContext } from "./plate-context";
import type { SlabCache } from "./slab-solid";
import { smallPartsFit, type CylinderFit } from "./small-parts";

export type PlatePart = {
  id: string;
  name: string;
  /** A closed mesh standing on z = 0 (as import and orientation leave it). */
  mesh: IndexedMesh;
  quantity: number;
};

/** What a build needs to know of a part, measured once per mesh and layer height; kernel-free. */
export type PartMeasure = {
  shadow: Contour[];
  shadowArea: number;
  contact: Contour[];
  contactArea: number;
  hull: [number, number][];
  height: number;
  size: [number, number, number];
  volume: number;
  smallParts: CylinderFit;
};

/**
 * What one process keeps between builds: each part's measures (by mesh object and layer height) and
 * the last few slab solids, by a fingerprint of exactly what shapes them (outline, thickness, every
 * mark's cross-section and depth). A change that leaves the slab as it was (the gap, the material, a
 * price) then reuses it instead of running the booleans again.
 */
export type PartCache = { parts: WeakMap<IndexedMesh, Map<number, PartMeasure>>; slabs: SlabCache; nests: NestCache };
export const newPartCache = (): PartCache => ({ parts: new WeakMap(), slabs: new Map(), nests: new Map() });
/**
 * The last few nests a process worked out, by exactly what shapes them (the pieces' outlines, the
 * room they take, the bands, the bed): an option change that moves no piece (depths, the gap, the
 * material) then re-nests nothing. Each piece's turn, place and number side by slot, and the bands'.
 */
export type NestCache = Map<
  string,
  { pieces: [number, number, number, number][]; bandsAt: { bottom?: [number, number]; top?: [number, number] } }
>;

function measurePart(kernel: Kernel, scope: Scope, mesh: IndexedMesh, layerHeight: number, cache?: PartCache): PartMeasure {
  const hit = cache?.parts.get(mesh)?.get(layerHeight);
  if (hit) return hit;
  const { Manifold, Mesh } = kernel.wasm;
  const solid = scope.track(new Manifold(new Mesh({ numProp: 3, vertProperties: mesh.vertProperties, triVerts: mesh.triVerts })));
  const fp = measureFootprint(kernel, scope, solid, layerHeight);
  const box = solid.boundingBox();
  const m: PartMeasure = {
    shadow: fp.shadow.toPolygons(),
    shadowArea: fp.shadowArea,
    contact: fp.contact.toPolygons(),
    contactArea: fp.contactArea,
    hull: fp.hull,
    height: fp.height,
    size: [box.max[0] - box.min[0], box.max[1] - box.min[1], box.max[2] - box.min[2]],
    volume: solid.volume(),
    smallParts: smallPartsFit(mesh.vertProperties),
  };
  if (cache) {
    const byLayer = cache.parts.get(mesh) ?? new Map<number, PartMeasure>();
    byLayer.set(layerHeight, m);
    cache.parts.set(mesh, byLayer);
  }
  return m;
}

/** Every part measured once (or taken from the cache), its footprints as kernel cross-sections. */
export function measureParts(
  ctx: PlateContext,
  parts: PlatePart[],
  cache?: PartCache,
): { measures: PartMeasure[]; footprints: PartFootprint[] } {
  const { kernel, scope } = ctx;
  const { CrossSection } = kernel.wasm;
  const measures = parts.map((part) => measurePart(kernel, scope, part.mesh, ctx.options.layerHeight, cache));
  const footprints = measures.map((pm) => ({
    shadow: scope.track(new CrossSection(pm.shadow, "Positive")),
    shadowArea: pm.shadowArea,
    contact: scope.track(new CrossSection(pm.contact, "Positive")),
    contactArea: pm.contactArea,
    hull: pm.hull,
    height: pm.height,
  }));
  return { measures, footprints };
}

/** One copy of a part on its way onto the slab: which part, its footprints, its turn and its place. */
export type Piece = {
  /** Place in kit order, from 1 (`layout.placements` and `layout.pieceNumbers` refer to it). */
  slot: number;
  part: PlatePart;
  /** The part's index in the build's parts (its measures). */
  partIndex: number;
  copy: number;
  fp: PartFootprint;
  /** Turn about Z (degrees) and where the part's origin sits (mm). */
  angle: number;
  /** Where its number sits by its ring when nested by shape (hug.ts `numberSpot`): 0 left of its top, by default. */
  numberSide?: number;
  x: number;
  y: number;
};

/**
 * Pieces in kit order: copies, then parts, then quantity; each first turned to its best packing
 * angle. With `layout.pieces`, only those slots (a plate of a split kit), keeping their kit slots.
 */
export function kitPieces(o: SlabOptions, parts: PlatePart[], footprints: PartFootprint[]): Piece[] {
  const pieces: Piece[] = [];
  let slot = 0;
  const only = o.layout.pieces ? new Set(o.layout.pieces) : null;
  for (let copy = 1; copy <= o.layout.copies; copy++) {
    parts.forEach((part, partIndex) => {
      for (let q = 0; q < part.quantity; q++) {
        slot++;
        if (only && !only.has(slot)) continue;
        const fp = footprints[partIndex]!;
        pieces.push({ slot, part, partIndex, copy, fp, angle: bestPackingAngle(fp.hull), x: 0, y: 0 });
      }
    });
  }
  return pieces;
}

/** How many pieces the whole kit holds (every copy of every part). */
export function kitSize(o: SlabOptions, parts: PlatePart[]): number {
  return o.layout.copies * parts.reduce((s, p) => s + p.quantity, 0);
}

/** The piece in a slot (slots count from 1 in kit order, as `kitPieces` gives them). */
export function pieceInSlot(pieces: Piece[], slot: number): Piece {
  const at = pieces[slot - 1];
  return at && at.slot === slot ? at : pieces.find((p) => p.slot === slot)!;
}

/** The piece's shadow extent where it stands (its hull turned and moved). */
export function pieceBounds(p: Piece): Box {
  const rb = rotatedBounds(p.fp.hull, p.angle);
  return { minX: p.x + rb.minX, minY: p.y + rb.minY, maxX: p.x + rb.maxX, maxY: p.y + rb.maxY };
}

/** The shadow's convex hull where the piece stands. */
export function hullAt(p: Piece): [number, number][] {
  const r = (p.angle * Math.PI) / 180,
    c = Math.cos(r),
    sn = Math.sin(r);
  return p.fp.hull.map(([x, y]) => [c * x - sn * y + p.x, sn * x + c * y + p.y]);
}

export function placedShadow(scope: Scope, p: Piece): CrossSection {
  return scope.track(scope.track(p.fp.shadow.rotate(p.angle)).translate(p.x, p.y));
}

export function movePieces(pieces: Piece[], dx: number, dy: number): void {
  for (const p of pieces) {
    p.x += dx;
    p.y += dy;
  }
}

/**
 * Height of a piece's base above the bed: on the gap above the slab, or that much lower when it
 * stands in its pocket.
 */
export function pieceLift(o: SlabOptions, pocketDepth: number): number {
  return o.slab.thickness + o.slab.gap - (o.marks.outlines === "pocket" ? pocketDepth : 0);
}

export type PlacedPiece = {
  /** The number engraved beside the piece and listed on the plate map: row by row from the top left. */
  number: number;
  /** The piece's place in kit order (copy, then part, then quantity), which `layout.placements` refers to. */
  slot: number;
  partId: string;
  partName: string;
  copy: number;
  /** Where the part's origin sits on the slab (mm) and its turn about Z (degrees). */
  x: number;
  y: number;
  rotation: number;
  /** Height of the part's base above the bed: slab thickness + gap (less the pocket depth for pockets). */
  z: number;
  height: number;
  shadowArea: number;
  contactArea: number;
  /** The shadow footprint's extent on the slab. */
  bounds: Box;
  /** The shadow outline on the slab (outer contours), for the plate map. */
  outline: Contour[];
  numberAt?: { x: number; y: number };
};

/** The pieces as the plate checks take them (checks.ts), in kit order. */
export function checkedPieces(
  pieces: Piece[],
  numberOf: Map<number, number>,
  shadows: CrossSection[],
  ringExt: number,
): CheckInput["pieces"] {
  return pieces.map((p, i) => ({
    number: numberOf.get(p.slot)!,
    shadow: shadows[i]!,
    name: p.part.name,
    height: p.fp.height,
    contactArea: p.fp.contactArea,
    partId: p.part.id,
    bounds: pieceBounds(p),
    ringExt,
  }));
}

/** The pieces as the result lists them, by number (`shadows` in the pieces' order, `glyphs` by slot). */
export function placedPieces(
  pieces: Piece[],
  at: { numberOf: Map<number, number>; shadows: CrossSection[]; glyphs: Map<number, NumberGlyphs>; z: number },
): PlacedPiece[] {
  const placed = pieces.map((p, i): PlacedPiece => {
    const g = at.glyphs.get(p.slot);
    return {
      number: at.numberOf.get(p.slot)!,
      slot: p.slot,
      partId: p.part.id,
      partName: p.part.name,
      copy: p.copy,
      x: p.x,
      y: p.y,
      rotation: p.angle,
      z: at.z,
      height: p.fp.height,
      shadowArea: p.fp.shadowArea,
      contactArea: p.fp.contactArea,
      bounds: pieceBounds(p),
      outline: at.shadows[i]!.toPolygons(),
      numberAt: g ? { x: g.box.minX, y: g.y } : undefined,
    };
  });
  return placed.sort((a, b) => a.number - b.number);
}

/** Each placed piece's mesh: its part's own welded mesh turned and moved in plain arithmetic (no kernel round trip). */
export function pieceMeshes(placed: PlacedPiece[], pieces: Piece[]): { piece: PlacedPiece; mesh: IndexedMesh }[] {
  return placed.map((p) => ({ piece: p, mesh: placeMesh(pieceInSlot(pieces, p.slot).part.mesh, p.rotation, p.x, p.y, p.z) }));
}

/** Turn a mesh about Z by `deg` and move it to (x, y, z). */
export function placeMesh(mesh: IndexedMesh, deg: number, x: number, y: number, z: number): IndexedMesh {
  const r = (deg * Math.PI) / 180,
    c = Math.cos(r),
    s = Math.sin(r);
  const p = mesh.vertProperties;
  const out = new Float32Array(p.length);
  for (let i = 0; i < p.length; i += 3) {
    const px = p[i]!,
      py = p[i + 1]!;
    out[i] = c * px - s * py + x;
    out[i + 1] = s * px + c * py + y;
    out[i + 2] = p[i + 2]! + z;
  }
  return { vertProperties: out, triVerts: mesh.triVerts };
}
