import type opentype from "opentype.js";

export type Contour = [number, number][];

/** Text laid out in millimetres, y up, baseline at y = 0, starting at x = 0. */
export type TextShape = {
  contours: Contour[];
  /** Sum of advance widths and kerning, mm. */
  advance: number;
  /** Visible extent of the outlines, mm. */
  bounds: { minX: number; minY: number; maxX: number; maxY: number };
  /** The font size (em) used, mm, to give the asked cap height. */
  emSize: number;
};

/**
 * How long a laid-out line is: from its pen origin (or from its ink, where a glyph reaches left of
 * the origin) to the right end of its ink. A band reserves this much for the line, and every check
 * on a line's length (its template's maxWidth, the bed) measures this.
 */
export function lineWidth(shape: Pick<TextShape, "bounds">): number {
  return shape.bounds.maxX - Math.min(0, shape.bounds.minX);
}

/** Chord tolerance for flattening glyph curves, mm: area error about 2·10⁻³ on 5 mm text (measured). */
export const TEXT_TOLERANCE = 0.01;

export function capHeightUnits(font: opentype.Font): number {
  const os2 = font.tables.os2 as { sCapHeight?: number } | undefined;
  if (os2?.sCapHeight && os2.sCapHeight > 0) return os2.sCapHeight;
  const h = font.charToGlyph("H").getBoundingBox();
  return h.y2 > 0 ? h.y2 : font.unitsPerEm * 0.7;
}

/** Kerning between two glyphs in font units, from the font's pair table (opentype.js's own lookup misses it for some fonts). */
function kern(font: opentype.Font, a: opentype.Glyph, b: opentype.Glyph): number {
  const pairs = (font as unknown as { kerningPairs?: Record<string, number> }).kerningPairs;
  const v = pairs?.[`${a.index},${b.index}`];
  if (v !== undefined) return v;
  return font.getKerningValue(a, b) || 0;
}

/** Advance width of each glyph plus pair kerning, in font units, as a layout engine would place them. */
export function advanceUnits(font: opentype.Font, text: string): number {
  const glyphs = font.stringToGlyphs(text);
  let x = 0;
  glyphs.forEach((g, i) => {
    x += g.advanceWidth ?? 0;
    const next = glyphs[i + 1];
    if (next) x += kern(font, g, next);
  });
  return x;
}

/**
 * Lay out one line with the font's own advance widths and kerning, and flatten its outlines to
 * polylines within `tolerance` mm. Glyph paths come in font units with y up, so TrueType outer
 * contours run clockwise: fill them with the NonZero rule (holes in o, e, 4, B, 8 then come out right).
 */
export function layoutText(font: opentype.Font, text: string, capHeightMm: number, tolerance = TEXT_TOLERANCE): TextShape {
  const emSize = (capHeightMm * font.unitsPerEm) / capHeightUnits(font);
  const scale = emSize / font.unitsPerEm;
  const tol = tolerance / scale; // in font units
  const glyphs = font.stringToGlyphs(text);
  const contours: Contour[] = [];
  let pen = 0;
  glyphs.forEach((g, i) => {
    flattenPath(g.path.commands as PathCommand[], pen, tol, contours, scale);
    pen += g.advanceWidth ?? 0;
    const next = glyphs[i + 1];
    if (next) pen += kern(font, g, next);
  });
  let minX = Infinity,
    minY = Infinity,
    maxX = -Infinity,
    maxY = -Infinity;
  for (const c of contours) {
    for (const [x, y] of c) {
      if (x < minX) minX = x;
      if (x > maxX) maxX = x;
      if (y < minY) minY = y;
      if (y > maxY) maxY = y;
    }
  }
  if (contours.length === 0) minX = minY = maxX = maxY = 0;
  return { contours, advance: pen * scale, bounds: { minX, minY, maxX, maxY }, emSize };
}

/** Outline commands as opentype.js gives them (and the logo reader makes from SVG paths). */
export type PathCommand =
  | { type: "M" | "L"; x: number; y: number }
  | { type: "Q"; x1: number; y1: number; x: number; y: number }
  | { type: "C"; x1: number; y1: number; x2: number; y2: number; x: number; y: number }
  | { type: "Z" };

/** Flatten outline commands (in their own units, shifted by dx) to polylines within `tol` of those units, scaled to mm. */
export function flattenPath(commands: PathCommand[], dx: number, tol: number, out: Contour[], scale: number) {
  let cur: Contour = [];
  let x = 0,
    y = 0,
    sx = 0,
    sy = 0;
  const push = (px: number, py: number) => cur.push([(px + dx) * scale, py * scale]);
  const close = () => {
    if (cur.length >= 3) {
      const [fx, fy] = cur[0]!;
      const [lx, ly] = cur[cur.length - 1]!;
      if (Math.abs(fx - lx) < 1e-9 && Math.abs(fy - ly) < 1e-9) cur.pop();
      if (cur.length >= 3) out.push(cur);
    }
    cur = [];
  };
  for (const c of commands) {
    switch (c.type) {
      case "M":
        close();
        x = sx = c.x;
        y = sy = c.y;
        push(x, y);
        break;
      case "L":
        x = c.x;
        y = c.y;
        push(x, y);
        break;
      case "Q": {
        // Uniform steps: deviation ≤ |p0 − 2p1 + p2| / (8n²).
        const d = Math.hypot(x - 2 * c.x1 + c.x, y - 2 * c.y1 + c.y);
        const n = Math.max(1, Math.ceil(Math.sqrt(d / (8 * tol))));
        for (let i = 1; i <= n; i++) {
          const t = i / n,
            u = 1 - t;
          push(u * u * x + 2 * u * t * c.x1 + t * t * c.x, u * u * y + 2 * u * t * c.y1 + t * t * c.y);
        }
        x = c.x;
        y = c.y;
        break;
      }
      case "C": {
        // Uniform steps: deviation ≤ 3·max(|p0 − 2p1 + p2|, |p1 − 2p2 + p3|) / (4n²).
        const m = Math.max(Math.hypot(x - 2 * c.x1 + c.x2, y - 2 * c.y1 + c.y2), Math.hypot(c.x1 - 2 * c.x2 + c.x, c.y1 - 2 * c.y2 + c.y));
        const n = Math.max(1, Math.ceil(Math.sqrt((3 * m) / (4 * tol))));
        for (let i = 1; i <= n; i++) {
          const t = i / n,
            u = 1 - t;
          push(
            u * u * u * x + 3 * u * u * t * c.x1 + 3 * u * t * t * c.x2 + t * t * t * c.x,
            u * u * u * y + 3 * u * u * t * c.y1 + 3 * u * t * t * c.y2 + t * t * t * c.y,
          );
        }
        x = c.x;
        y = c.y;
        break;
      }
      case "Z":
        x = sx;
        y = sy;
        close();
        break;
    }
  }
  close();
}
