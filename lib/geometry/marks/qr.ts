import QRCode from "qrcode";
import type { Contour } from "./text";

export type QrShape = {
  /** Dark modules as rectangles (one per horizontal run), mm, origin at the code's lower-left corner. */
  contours: Contour[];
  /** Modules a side: 17 + 4·version (ISO/IEC 18004). */
  modules: number;
  version: number;
  /** Side of the code without its quiet zone, mm. */
  size: number;
  /** Side including the 4-module quiet zone on every side, mm. */
  sizeWithQuietZone: number;
};

/** ISO/IEC 18004: four modules of quiet zone around the symbol. */
export const QUIET_ZONE_MODULES = 4;

/**
 * Modules that touch only at a corner would make pinch points in the solid: grow every run by a
 * hair so corner neighbours overlap (measured: independent STL checkers mis-pair faces otherwise).
 */
const GROW = 0.005;

/** The symbol's dark modules as horizontal runs (row 0 at the top), with its size in modules and version. */
export function qrRuns(
  value: string,
  level: "L" | "M" | "Q" | "H",
): { modules: number; version: number; runs: { row: number; start: number; end: number }[] } {
  const qr = QRCode.create(value, { errorCorrectionLevel: level });
  const n = qr.modules.size;
  const runs: { row: number; start: number; end: number }[] = [];
  for (let row = 0; row < n; row++) {
    let col = 0;
    while (col < n) {
      if (!qr.modules.get(row, col)) {
        col++;
        continue;
      }
      const start = col;
      while (col < n && qr.modules.get(row, col)) col++;
      runs.push({ row, start, end: col });
    }
  }
  return { modules: n, version: qr.version, runs };
}

export function qrShape(value: string, moduleMm: number, level: "L" | "M" | "Q" | "H"): QrShape {
  const { modules: n, version, runs } = qrRuns(value, level);
  // Row 0 is the top of the symbol; y runs up on the slab.
  const contours: Contour[] = runs.map(({ row, start, end }) => {
    const x0 = start * moduleMm - GROW,
      x1 = end * moduleMm + GROW;
    const y1 = (n - row) * moduleMm + GROW,
      y0 = (n - row - 1) * moduleMm - GROW;
    return [
      [x0, y0],
      [x1, y0],
      [x1, y1],
      [x0, y1],
    ];
  });
  const size = n * moduleMm;
  return { contours, modules: n, version, size, sizeWithQuietZone: size + 2 * QUIET_ZONE_MODULES * moduleMm };
}
