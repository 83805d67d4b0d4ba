/**
 * Where things go on the plate map sheet, as plain geometry shared by the PDF and the printable page:
 * the paper sizes, the tiles a slab larger than the paper is cut into at 1:1, and where each piece's
 * number stands (inside its outline, or beside it on a leader line when the piece is too small).
 */

/** Paper sizes in mm: A4 and A3 by ISO 216, Letter (8.5 × 11 in) and Tabloid (11 × 17 in) by ANSI/ASME Y14.1. */
export const PAPERS = {
  a4: { w: 210, h: 297, label: "A4" },
  letter: { w: 215.9, h: 279.4, label: "Letter" },
  a3: { w: 297, h: 420, label: "A3" },
  tabloid: { w: 279.4, h: 431.8, label: "Tabloid" },
} as const;
export type Paper = keyof typeof PAPERS;
export const PAPER_IDS = Object.keys(PAPERS) as Paper[];

/** How much neighbouring tiles share, so they can be laid edge over edge and lined up (mm). */
export const TILE_OVERLAP = 10;

export type Box = { minX: number; minY: number; maxX: number; maxY: number };

/** One page's window onto the slab (slab mm, y up), and where it sits among the others. */
export type Tile = { column: number; row: number; x0: number; y0: number; w: number; h: number };
export type TilePlan = { columns: number; rows: number; tiles: Tile[] };

/**
 * The slab cut into windows no larger than `area`, neighbours overlapping by `overlap`: one window
 * when it fits. Rows run from the slab's far edge (top of the drawing) down, columns left to right,
 * so the pages read like the slab does.
 */
export function tilePlan(slab: { width: number; depth: number }, area: { w: number; h: number }, overlap = TILE_OVERLAP): TilePlan {
  const along = (length: number, room: number) => {
    if (length <= room) return [{ start: 0, size: length }];
    const step = room - overlap;
    const n = Math.ceil((length - overlap) / step);
    // Neighbours share exactly `overlap`; the last window is as long as what is left.
    return Array.from({ length: n }, (_, i) => ({ start: i * step, size: Math.min(room, length - i * step) }));
  };
  const xs = along(slab.width, area.w);
  // From the top: the first row holds the largest y.
  const ys = along(slab.depth, area.h).map(({ start, size }) => ({ start: slab.depth - start - size, size }));
  const tiles: Tile[] = [];
  ys.forEach((y, row) => xs.forEach((x, column) => tiles.push({ column, row, x0: x.start, y0: y.start, w: x.size, h: y.size })));
  return { columns: xs.length, rows: ys.length, tiles };
}

export type PieceLabel = {
  number: number;
  /** The label's centre and its box (drawing mm, y up). */
  x: number;
  y: number;
  size: number;
  box: Box;
  inside: boolean;
  /** From the piece to the label, when the label stands beside it. */
  leader?: [number, number, number, number];
};

const overlaps = (a: Box, b: Box) => a.minX < b.maxX && b.minX < a.maxX && a.minY < b.maxY && b.minY < a.maxY;
const boxAt = (x: number, y: number, w: number, h: number): Box => ({ minX: x - w / 2, maxX: x + w / 2, minY: y - h / 2, maxY: y + h / 2 });

/**
 * Each piece's number: inside its outline when the label fits its bounds with a margin, else beside
 * it (right, left, above, below: the first place that covers no other piece or label) with a leader
 * from the piece's centre. `width(text, size)` measures a label in mm; its height is taken as 0.75 of
 * the size (the digits' cap height in the sheet's faces).
 */
export function placeLabels(
  pieces: { number: number; bounds: Box }[],
  width: (text: string, size: number) => number,
  sizes = { min: 2.2, max: 5 },
): PieceLabel[] {
  const pad = 0.5,
    gap = 1.5;
  const placed: Box[] = [];
  const out: PieceLabel[] = [];
  const others = (n: number) => pieces.filter((p) => p.number !== n).map((p) => p.bounds);
  for (const p of pieces) {
    const b = p.bounds;
    const bw = b.maxX - b.minX,
      bh = b.maxY - b.minY;
    const cx = (b.minX + b.maxX) / 2,
      cy = (b.minY + b.maxY) / 2;
    const text = String(p.number);
    const size = Math.max(sizes.min, Math.min(sizes.max, bw / 2.5));
    const w = width(text, size),
      h = size * 0.75;
    if (w + 2 * pad <= bw && h + 2 * pad <= bh) {
      const box = boxAt(cx, cy, w, h);
      placed.push(box);
      out.push({ number: p.number, x: cx, y: cy, size, box, inside: true });
      continue;
    }
    const small = sizes.min;
    const sw = width(text, small),
      sh = small * 0.75;
    const candidates: [number, number][] = [
      [b.maxX + gap + sw / 2, cy],
      [b.minX - gap - sw / 2, cy],
      [cx, b.maxY + gap + sh / 2],
      [cx, b.minY - gap - sh / 2],
      [b.maxX + gap + sw / 2, b.maxY + gap + sh / 2],
      [b.minX - gap - sw / 2, b.minY - gap - sh / 2],
    ];
    const blockers = [...others(p.number), ...placed];
    const [x, y] = candidates.find(([x, y]) => !blockers.some((o) => overlaps(boxAt(x, y, sw + pad, sh + pad), o))) ?? candidates[0]!;
    const box = boxAt(x, y, sw, sh);
    placed.push(box);
    // The leader ends at the label's nearest edge point.
    const ex = Math.min(Math.max(cx, box.minX), box.maxX),
      ey = Math.min(Math.max(cy, box.minY), box.maxY);
    out.push({ number: p.number, x, y, size: small, box, inside: false, leader: [cx, cy, ex, ey] });
  }
  return out;
}
