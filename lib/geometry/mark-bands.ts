import { logoContours, logoHeight } from "./marks/logo";
import { qrShape, type QrShape } from "./marks/qr";
import { layoutText, lineWidth, type TextShape } from "./marks/text";
import type { LogoMark, MarkPosition, QrMark, SlabOptions, TextMark } from "./options";
import type { PieceRoom } from "./piece-layout";
import { pieceBounds, type Piece } from "./pieces";
import type { Box, PlateContext } from "./plate-context";
import { SHAPE_RULES } from "./slab";
import { fillPlaceholders } from "./variables";
import { numberSpot, ringHullAt } from "./hug";

/** Baseline to baseline of two text lines in a band, in cap heights of the lower line. */
export const LINE_PITCH = 1.6;
/** Room under a band's last line for its descenders, in cap heights of that line. */
export const DESCENT = 0.4;
/** Between a piece's number and its ring box (mm). */
export const NUMBER_GAP = 0.8;
/** Above and below a number's cap height in its row (mm). */
export const NUMBER_PAD = 0.3;

/**
 * A text line with its placeholders filled and laid out: `line` is its place in the options' text
 * lines, `size` the cap height it is laid out at (its mark's size, or less where it was shrunk to fit).
 */
export type TextLine = { mark: TextMark; line: number; value: string; size: number; shape: TextShape };
export type QrCode = { mark: QrMark; value: string; shape: QrShape };
export type Logo = { mark: LogoMark; w: number; h: number; parts: ReturnType<typeof logoContours> };
/** The marks that need room, with their placeholders filled and their shapes laid out (mm, kernel-free). */
export type MarkShapes = { texts: TextLine[]; qr: QrCode | null; logo: Logo | null };

export function markShapes(ctx: PlateContext): MarkShapes {
  const { marks } = ctx.options;
  const texts = marks.text.map((mark, line) => {
    const value = fillPlaceholders(mark.value, ctx.vars);
    return { mark, line, value, size: mark.size, shape: layoutText(ctx.fonts[mark.font], value, mark.size) };
  });
  const qrValue = marks.qr ? fillPlaceholders(marks.qr.value, ctx.vars) : "";
  const qr = marks.qr ? { mark: marks.qr, value: qrValue, shape: qrShape(qrValue, marks.qr.module, marks.qr.level) } : null;
  const lg = marks.logo;
  const logo = lg ? { mark: lg, w: lg.width, h: logoHeight(lg, lg.width), parts: logoContours(lg, lg.width) } : null;
  return { texts, qr, logo };
}

/** The widest piece number's advance (the numbers given, or up to the piece count), 0 without numbers. */
export function numberWidth(ctx: PlateContext, pieceCount: number): number {
  const o = ctx.options;
  if (!o.marks.numbers) return 0;
  const highest = Math.max(1, pieceCount, ...(o.layout.pieceNumbers ?? []));
  return layoutText(ctx.fonts[o.marks.numberStyle.font], String(highest), o.marks.numberStyle.size).advance;
}

/** A band above or below the pieces: the logo at the left, then the text lines, the QR at the right. */
export type Band = { lines: TextLine[]; qr: QrCode | null; logo: Logo | null; h: number; w: number; textH: number; logoW: number };
/** Both bands, and the height and width they take on the slab (with the spacing to the pieces). */
export type Bands = { bottom: Band; top: Band; h: number; w: number };

/** Whether a mark at `position` sits in that band ("auto" is the bottom band; a hand-placed mark is in neither). */
export function inBand(position: MarkPosition, where: "top" | "bottom"): boolean {
  return position === where || (where === "bottom" && position === "auto");
}

function band(shapes: MarkShapes, where: "top" | "bottom", spacing: number): Band {
  const lines = shapes.texts.filter((t) => inBand(t.mark.position, where));
  const qr = shapes.qr && inBand(shapes.qr.mark.position, where) ? shapes.qr : null;
  const logo = shapes.logo && inBand(shapes.logo.mark.position, where) ? shapes.logo : null;
  const textH =
    lines.reduce((s, t, i) => s + t.size * (i === 0 ? 1 : LINE_PITCH), 0) + (lines.length ? DESCENT * lines[lines.length - 1]!.size : 0);
  const textW = Math.max(0, ...lines.map((t) => lineWidth(t.shape)));
  const qrSide = qr ? qr.shape.sizeWithQuietZone : 0;
  const h = Math.max(textH, qrSide, logo?.h ?? 0);
  const items = [logo?.w ?? 0, textW, qrSide].filter((x) => x > 0);
  const w = items.reduce((a, b) => a + b, 0) + spacing * Math.max(0, items.length - 1);
  const logoW = logo ? logo.w + spacing : 0;
  return { lines, qr, logo, h, w, textH, logoW };
}

export function markBands(shapes: MarkShapes, spacing: number): Bands {
  const bottom = band(shapes, "bottom", spacing);
  const top = band(shapes, "top", spacing);
  return { bottom, top, h: (bottom.h ? bottom.h + spacing : 0) + (top.h ? top.h + spacing : 0), w: Math.max(bottom.w, top.w) };
}

/** A piece's number laid out, at the top left of its piece's ring box and never below its bottom. */
export type NumberGlyphs = { shape: TextShape; x: number; y: number; box: Box };

/** The numbers' glyphs, by slot (none without numbers): content the slab is built around, like the pieces and the bands. */
export function numberGlyphs(
  ctx: PlateContext,
  pieces: Piece[],
  numberOf: Map<number, number>,
  room: PieceRoom,
): Map<number, NumberGlyphs> {
  const out = new Map<number, NumberGlyphs>();
  const o = ctx.options;
  if (!o.marks.numbers) return out;
  const font = ctx.fonts[o.marks.numberStyle.font];
  const size = o.marks.numberStyle.size;
  const { ext, gutter } = room;
  for (const p of pieces) {
    const b = pieceBounds(p);
    const shape = layoutText(font, String(numberOf.get(p.slot)!), size);
    let x: number, y: number;
    if (room.hug) {
      // Beside the ring where the piece stands, at its top: as the nest left room for it (piece-nest.ts).
      const spot = numberSpot(
        ringHullAt(p.fp.hull, p.angle, ext).map(([hx, hy]) => [hx + p.x, hy + p.y]),
        room.numberRow,
        NUMBER_GAP,
        gutter - NUMBER_GAP,
        p.numberSide ?? 0,
      );
      x = spot.minX - Math.min(0, shape.bounds.minX);
      y = spot.rowTop - size - NUMBER_PAD;
    } else {
      x = b.minX - ext - gutter - Math.min(0, shape.bounds.minX);
      y = Math.max(b.maxY + ext, b.minY - ext + size + 2 * NUMBER_PAD) - size - NUMBER_PAD;
    }
    out.set(p.slot, {
      shape,
      x,
      y,
      box: { minX: x + shape.bounds.minX, minY: y + shape.bounds.minY, maxX: x + shape.bounds.maxX, maxY: y + shape.bounds.maxY },
    });
  }
  return out;
}

/** Where each band goes: its left edge, its lower edge and its width. */
export type BandFrame = { bottom: { x: number; y: number; w: number }; top: { x: number; y: number; w: number } };

/** The bands below and above the pieces' boxes (rings and numbers included), as wide as the wider of the two. */
export function bandFrame(o: SlabOptions, pieceBoxes: Box[], bands: Bands, spacing: number): BandFrame {
  const m = o.slab.margin;
  const piecesMaxX = Math.max(m, ...pieceBoxes.map((b) => b.maxX));
  const piecesMinY = Math.min(...pieceBoxes.map((b) => b.minY), m + (bands.bottom.h ? bands.bottom.h + spacing : 0));
  const piecesMaxY = Math.max(m, ...pieceBoxes.map((b) => b.maxY));
  const w = Math.max(piecesMaxX - m, bands.w);
  return {
    bottom: { x: m, y: Math.min(m, piecesMinY - spacing - bands.bottom.h), w },
    top: { x: m, y: piecesMaxY + (bands.top.h ? spacing : 0), w },
  };
}

/** The bands where the nest put them (lower left corners), each as wide as its own marks. */
export function nestedFrame(bands: Bands, at: { bottom?: [number, number]; top?: [number, number] }): BandFrame {
  const b = at.bottom ?? [0, 0],
    t = at.top ?? [0, 0];
  return { bottom: { x: b[0], y: b[1], w: bands.bottom.w }, top: { x: t[0], y: t[1], w: bands.top.w } };
}

export type TextBlock = TextLine & { x: number; y: number };
export type QrBlock = QrCode & { x: number; y: number };
export type LogoBlock = { value: string; x: number; y: number; w: number; h: number };
/** The marks where they go on the slab: text lines (bottom band, top band, then hand-placed), the QR, the logo. */
export type MarkPlaces = { texts: TextBlock[]; qr: QrBlock | null; logo: LogoBlock | null };

/** Text left-aligned in its band (centred on a disc), the logo at the band's left, the QR at its right; hand-placed marks where asked. */
export function placeMarks(o: SlabOptions, shapes: MarkShapes, bands: Bands, frame: BandFrame, spacing: number): MarkPlaces {
  const texts: TextBlock[] = [];
  const placeBand = (b: Band, f: BandFrame["bottom"]) => {
    const y0 = f.y;
    let y = y0 + b.h - (b.lines[0]?.size ?? 0) - Math.max(0, (b.h - b.textH) / 2);
    b.lines.forEach((t, i) => {
      if (i > 0) y -= t.size * LINE_PITCH;
      // On a disc the lines are centred (in the room the QR leaves), which keeps the disc small.
      const room = f.w - b.logoW - (b.qr ? b.qr.shape.sizeWithQuietZone + spacing : 0);
      const width = lineWidth(t.shape);
      const indent = SHAPE_RULES[o.slab.shape].centreText ? Math.max(0, (room - width) / 2) : 0;
      texts.push({ ...t, x: f.x + b.logoW + indent - Math.min(0, t.shape.bounds.minX), y });
    });
  };
  placeBand(bands.bottom, frame.bottom);
  placeBand(bands.top, frame.top);
  for (const t of shapes.texts) {
    if (typeof t.mark.position === "object") texts.push({ ...t, x: t.mark.position.x, y: t.mark.position.y });
  }
  let logo: LogoBlock | null = null;
  if (shapes.logo) {
    const { mark, w, h } = shapes.logo;
    const pos = mark.position;
    const b = pos === "top" ? bands.top : bands.bottom;
    logo =
      typeof pos === "object"
        ? { value: mark.name, x: pos.x, y: pos.y, w, h }
        : {
            value: mark.name,
            x: (pos === "top" ? frame.top : frame.bottom).x,
            y: (pos === "top" ? frame.top : frame.bottom).y + (b.h - h) / 2,
            w,
            h,
          };
  }
  let qr: QrBlock | null = null;
  if (shapes.qr) {
    const side = shapes.qr.shape.sizeWithQuietZone;
    const pos = shapes.qr.mark.position;
    const f = pos === "top" ? frame.top : frame.bottom;
    const x = typeof pos === "object" ? pos.x : f.x + f.w - side;
    const y = typeof pos === "object" ? pos.y : pos === "top" ? f.y + bands.top.h - side : f.y;
    qr = { ...shapes.qr, x, y };
  }
  return { texts, qr, logo };
}

/** Each placed mark's kind, value and extent on the slab: text by its outlines, the QR with its quiet zone, the logo by its box. */
export function markList(places: MarkPlaces): { kind: "text" | "qr" | "logo"; value: string; bounds: Box }[] {
  const { texts, qr, logo } = places;
  return [
    ...texts.map((b) => ({
      kind: "text" as const,
      value: b.value,
      bounds: {
        minX: b.x + b.shape.bounds.minX,
        minY: b.y + b.shape.bounds.minY,
        maxX: b.x + b.shape.bounds.maxX,
        maxY: b.y + b.shape.bounds.maxY,
      },
    })),
    ...(qr
      ? [
          {
            kind: "qr" as const,
            value: qr.value,
            bounds: { minX: qr.x, minY: qr.y, maxX: qr.x + qr.shape.sizeWithQuietZone, maxY: qr.y + qr.shape.sizeWithQuietZone },
          },
        ]
      : []),
    ...(logo
      ? [{ kind: "logo" as const, value: logo.value, bounds: { minX: logo.x, minY: logo.y, maxX: logo.x + logo.w, maxY: logo.y + logo.h } }]
      : []),
  ];
}

export function moveMarks(places: MarkPlaces, glyphs: Map<number, NumberGlyphs>, dx: number, dy: number): void {
  for (const b of [...places.texts, ...(places.qr ? [places.qr] : []), ...(places.logo ? [places.logo] : [])]) {
    b.x += dx;
    b.y += dy;
  }
  for (const g of glyphs.values()) {
    g.x += dx;
    g.y += dy;
    g.box = { minX: g.box.minX + dx, minY: g.box.minY + dy, maxX: g.box.maxX + dx, maxY: g.box.maxY + dy };
  }
}
