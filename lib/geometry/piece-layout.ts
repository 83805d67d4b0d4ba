import { rotatedBounds } from "./footprint";
import { arrange, maxRectsPack, type PackItem } from "./layout";
import { SHAPE_RULES } from "./slab";
import { NUMBER_GAP, NUMBER_PAD, type Bands, type NumberGlyphs } from "./mark-bands";
import type { SlabOptions } from "./options";
import { hullAt, pieceBounds, pieceInSlot, type NestCache, type Piece } from "./pieces";
import type { Box, PlateContext } from "./plate-context";
import { nestPieces, type BandsAt } from "./piece-nest";

/** The least width a piece's rectangle takes, as it is or turned a quarter. */
function narrowest(p: Piece, room: PieceRoom): number {
  return Math.min(rotatedBounds(p.fp.hull, p.angle).w, rotatedBounds(p.fp.hull, p.angle + 90).w) + 2 * room.ext + room.gutter;
}

/** What a piece's rectangle on the bed holds besides its shadow. */
export type PieceRoom = {
  /** How far the ring (or pocket) reaches out of the shadow. */
  ext: number;
  /** Kept between pieces, and between the pieces and the bands. */
  spacing: number;
  /** Room at the left of the piece for its number (0 without numbers). */
  gutter: number;
  /** The number's row: the least height of a piece's rectangle (0 without numbers). */
  numberRow: number;
  /** Numbers hug their piece's ring (nested by shape) rather than sit in a gutter at the left of its box. */
  hug: boolean;
};

/** `numberWidth`: the widest number's advance (0 without numbers; see mark-bands.ts). */
export function pieceRoom(o: SlabOptions, numberWidth: number): PieceRoom {
  const ring = o.marks.ringStyle;
  return {
    ext: o.marks.outlines === "ring" ? ring.clearance + ring.width : o.marks.outlines === "pocket" ? ring.clearance : 0,
    // Whatever the spacing asked, the layout keeps pieces (or their rings and pockets) at least one
    // line of the nozzle apart: closer, two pieces print as one, and the slab left between two
    // outlines is a wall too thin to print (or none at all).
    spacing: Math.max(o.layout.spacing, o.nozzle),
    gutter: o.marks.numbers ? numberWidth + NUMBER_GAP : 0,
    numberRow: o.marks.numbers ? o.marks.numberStyle.size + 2 * NUMBER_PAD : 0,
    hug: o.layout.packing === "shapes",
  };
}

/** Whether the pieces found places; when not, the width the widest row needs and what the bed leaves. */
export type Placing = { fits: true; bandsAt?: BandsAt } | { fits: false; needW: number; maxW: number };

/**
 * Hand-placed pieces keep their places; the rest are packed to their right, above the bottom band,
 * within the bed less its margins and the bands. Sets each piece's angle, x and y. Packed pieces do
 * not fit when the packer finds no place for them, or the bands are wider than the bed (their text
 * lines are fitted to it first: text-fit.ts).
 */
export function placePieces(ctx: PlateContext, pieces: Piece[], room: PieceRoom, bands: Bands, cache?: NestCache): Placing {
  const o = ctx.options;
  if (o.layout.packing === "shapes") {
    const nested = nestPieces(ctx, pieces, room, bands, cache);
    if (nested) return { fits: true, bandsAt: nested.bandsAt };
    return {
      fits: false,
      maxW: o.layout.bed.width - 2 * o.slab.margin,
      needW: Math.max(bands.w, ...pieces.map((p) => narrowest(p, room))),
    };
  }
  const m = o.slab.margin;
  const { ext, gutter, spacing } = room;
  const maxW = o.layout.bed.width - 2 * m;
  const maxH = o.layout.bed.depth - 2 * m - bands.h;
  const fixed = new Map((o.layout.placements ?? []).map((p) => [p.piece, p]));
  // A piece's rectangle holds its shadow, its ring and, on the left, its number; the packer may also
  // take it turned a quarter (the gutter stays on the left, so that is a different size, not a swap).
  const sizeAt = (p: Piece, angle: number): [number, number] => {
    const rb = rotatedBounds(p.fp.hull, angle);
    return [rb.w + 2 * ext + gutter, Math.max(rb.h + 2 * ext, room.numberRow)];
  };
  const itemOf = (p: Piece): PackItem => ({ key: p.slot, sizes: [sizeAt(p, p.angle), sizeAt(p, p.angle + 90)] });
  const auto = pieces.filter((p) => !fixed.has(p.slot));
  const manual = pieces.filter((p) => fixed.has(p.slot));
  for (const p of manual) {
    const at = fixed.get(p.slot)!;
    p.angle = at.rotation;
    p.x = at.x;
    p.y = at.y;
  }
  if (!auto.length) return { fits: true };
  const manualMaxX = manual.length ? Math.max(...manual.map((p) => pieceBounds(p).maxX)) - m + spacing : 0;
  // Rate a candidate by the slab it leads to: the pieces' block with the bands above and below it;
  // for a disc, the diagonal of that whole block (the circle around it), else its area.
  const score = (w: number, h: number) => {
    const W = Math.max(w + manualMaxX, bands.w),
      H = h + bands.h;
    return SHAPE_RULES[o.slab.shape].packingScore(W, H);
  };
  const found = arrange(auto.map(itemOf), maxW - manualMaxX, maxH, spacing, score);
  if (!found || bands.w > maxW || maxH <= 0) {
    return { fits: false, maxW, needW: Math.max(bands.w, ...auto.map((p) => Math.min(...itemOf(p).sizes.map((d) => d[0])))) };
  }
  const baseY = m + (bands.bottom.h ? bands.bottom.h + spacing : 0);
  // With no piece placed by hand, a block of pieces narrower than the text and QR bands is centred
  // over them: the slab looks balanced and a disc round it comes out smaller.
  const centre = manual.length === 0 ? Math.max(0, (bands.w - found.width) / 2) : 0;
  for (const packed of found.packed) {
    const p = pieceInSlot(pieces, packed.key);
    if (packed.choice === 1) p.angle = (p.angle + 90) % 360;
    const rb = rotatedBounds(p.fp.hull, p.angle);
    p.x = packed.x + m + manualMaxX + centre + gutter + ext - rb.minX;
    p.y = packed.y + baseY + ext - rb.minY;
  }
  return { fits: true };
}

/**
 * What was tried when the pieces do not fit: the bed (mm, y up, its corner at 0, 0), the room the
 * margins and the text and QR bands leave, and every piece where a packer that may run past the bed's
 * depth (and, for a piece wider than the bed, its width) put it. `overflows` marks each piece, and the
 * bands, that reach past that room: what the designer has to change.
 */
export type TriedLayout = {
  bed: { width: number; depth: number };
  room: Box;
  bands: { bottom: Box | null; top: Box | null; overflows: boolean };
  pieces: { slot: number; partId: string; partName: string; copy: number; outline: [number, number][]; bounds: Box; overflows: boolean }[];
};

const EPS = 1e-6;

export function triedPlacement(o: SlabOptions, pieces: Piece[], room: PieceRoom, bands: Bands): TriedLayout {
  const m = o.slab.margin;
  const { ext, gutter, spacing } = room;
  const { width: W, depth: D } = o.layout.bed;
  const fixed = new Set((o.layout.placements ?? []).map((p) => p.piece));
  const sizeAt = (p: Piece, angle: number): [number, number] => {
    const rb = rotatedBounds(p.fp.hull, angle);
    return [rb.w + 2 * ext + gutter, Math.max(rb.h + 2 * ext, room.numberRow)];
  };
  const auto = pieces.filter((p) => !fixed.has(p.slot));
  const items = auto.map((p) => ({ key: p.slot, sizes: [sizeAt(p, p.angle), sizeAt(p, p.angle + 90)] }));
  const widest = Math.max(0, ...items.map((it) => Math.min(...it.sizes.map((d) => d[0]))));
  // Tall enough for every piece stacked, so the packer always places them all.
  const tall = items.reduce((s, it) => s + Math.max(...it.sizes.map((d) => d[1])) + spacing, 0);
  const baseY = m + (bands.bottom.h ? bands.bottom.h + spacing : 0);
  for (const packed of maxRectsPack(items, Math.max(W - 2 * m, widest), Math.max(tall, 1), spacing) ?? []) {
    const p = pieceInSlot(pieces, packed.key);
    if (packed.choice === 1) p.angle = (p.angle + 90) % 360;
    const rb = rotatedBounds(p.fp.hull, p.angle);
    p.x = packed.x + m + gutter + ext - rb.minX;
    p.y = packed.y + baseY + ext - rb.minY;
  }
  const roomBox = { minX: m, minY: baseY, maxX: W - m, maxY: D - m - (bands.top.h ? bands.top.h + spacing : 0) };
  const outside = (b: Box, r: Box) => b.minX < r.minX - EPS || b.minY < r.minY - EPS || b.maxX > r.maxX + EPS || b.maxY > r.maxY + EPS;
  const band = (h: number, y: number): Box | null => (h ? { minX: m, minY: y, maxX: m + bands.w, maxY: y + h } : null);
  return {
    bed: { width: W, depth: D },
    room: roomBox,
    bands: { bottom: band(bands.bottom.h, m), top: band(bands.top.h, D - m - bands.top.h), overflows: bands.w > W - 2 * m + EPS },
    pieces: pieces.map((p) => {
      const b = pieceBounds(p);
      const box = { minX: b.minX - ext - gutter, minY: b.minY - ext, maxX: b.maxX + ext, maxY: b.maxY + ext };
      return {
        slot: p.slot,
        partId: p.part.id,
        partName: p.part.name,
        copy: p.copy,
        outline: hullAt(p),
        bounds: b,
        overflows: outside(box, roomBox),
      };
    }),
  };
}

/**
 * Piece numbers in reading order: rows from the top down, each left to right by the pieces' centres.
 * A piece is in a row when its centre lies within the height of the row's first piece, or that
 * piece's centre within its own height (so a short piece beside a tall one reads in its row). The
 * numbers depend only on where the pieces are, so any change that leaves them in place keeps them.
 * `given` (in kit order, checked by `pieceNumbersMismatch`) replaces them, as a reprint keeps its
 * pieces' numbers. Keyed by slot.
 */
export function numberPieces(items: { slot: number; box: Box }[], given?: number[], first = 1): Map<number, number> {
  if (given) return new Map(items.map((it, i) => [it.slot, given[i]!]));
  const cy = (b: Box) => (b.minY + b.maxY) / 2,
    cx = (b: Box) => (b.minX + b.maxX) / 2;
  const order = [...items].sort((a, b) => cy(b.box) - cy(a.box) || cx(a.box) - cx(b.box) || a.slot - b.slot);
  const rows: { anchor: Box; members: typeof items }[] = [];
  for (const it of order) {
    const row = rows.find(
      (r) => (cy(it.box) >= r.anchor.minY && cy(it.box) <= r.anchor.maxY) || (cy(r.anchor) >= it.box.minY && cy(r.anchor) <= it.box.maxY),
    );
    if (row) row.members.push(it);
    else rows.push({ anchor: it.box, members: [it] });
  }
  const read = rows.flatMap((r) => r.members.sort((a, b) => cx(a.box) - cx(b.box) || a.slot - b.slot));
  return new Map(read.map((it, i) => [it.slot, i + first]));
}

/** Each piece's box on the slab with its ring and its number: content the slab is built around. Kit order. */
export function pieceBoxes(pieces: Piece[], room: PieceRoom, glyphs: Map<number, NumberGlyphs>): Box[] {
  const { ext } = room;
  const gutter = room.hug ? 0 : room.gutter;
  return pieces.map((p) => {
    const b = pieceBounds(p);
    const box = { minX: b.minX - ext - gutter, minY: b.minY - ext, maxX: b.maxX + ext, maxY: b.maxY + ext };
    const g = glyphs.get(p.slot)?.box;
    return g
      ? {
          minX: Math.min(box.minX, g.minX),
          minY: Math.min(box.minY, g.minY),
          maxX: Math.max(box.maxX, g.maxX),
          maxY: Math.max(box.maxY, g.maxY),
        }
      : box;
  });
}
