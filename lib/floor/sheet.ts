import { readFileSync } from "node:fs";
import path from "node:path";
import fontkit from "@pdf-lib/fontkit";
import {
  clip,
  endPath,
  PDFDocument,
  popGraphicsState,
  pushGraphicsState,
  rectangle,
  rgb,
  type PDFFont,
  type PDFPage,
  type RGB,
} from "pdf-lib";
import type { PlacedPiece, PlateLayout } from "@/lib/geometry/build-plate";
import type { Estimates } from "@/lib/geometry/estimates";
import { qrRuns, QUIET_ZONE_MODULES } from "@/lib/geometry/marks/qr";
import { MATERIALS, parseOptions } from "@/lib/geometry/options";
import { plateName } from "@/lib/plates/name";
import { plural } from "@/lib/plural";
import { PAPERS, placeLabels, tilePlan, TILE_OVERLAP, type Paper } from "./sheet-layout";

/**
 * The plate map sheet as PDF (pdf-lib): the slab's top view, each piece's outline and number (beside
 * it on a leader when the piece is too small to hold it), the table number → part → copy with a box to
 * tick, the sheet's own QR code to the plate's page in the app, material, estimates, the slicer
 * settings the plate assumes, and the cautions. The first page draws the slab at 1:1 when it fits;
 * otherwise it is an overview with its scale printed, and the slab follows at 1:1 on pages of its own,
 * cut into overlapping tiles with marks and page labels when it is larger than the paper.
 */

export { PAPERS, type Paper };

export type SheetPlate = {
  id: string;
  title: string | null;
  reference?: string | null;
  createdAt: Date;
  options: Record<string, unknown>;
  variables: Record<string, string>;
  findings: { code: string; severity: string }[];
  estimates: Estimates | null;
  layout: PlateLayout;
  pieces: PlacedPiece[];
  templateName?: string | null;
  templateVersion?: number | null;
  /** The one-line summary of the plate's proof (lib/proof), when it has one. */
  proofSummary?: string | null;
};

const PT = 72 / 25.4; // points per mm
const ink = rgb(0.12, 0.14, 0.16),
  muted = rgb(0.36, 0.39, 0.44),
  slabFill = rgb(0.94, 0.91, 0.86),
  markFill = rgb(0.54, 0.5, 0.42),
  pieceFill = rgb(0.29, 0.31, 0.34);

let fonts: { regular: Uint8Array; bold: Uint8Array } | undefined;
function fontBytes() {
  const dir = path.join(process.cwd(), "fonts");
  fonts ??= { regular: readFileSync(path.join(dir, "DejaVuSans.ttf")), bold: readFileSync(path.join(dir, "DejaVuSans-Bold.ttf")) };
  return fonts;
}

/** The scale a slab is drawn at on the sheet: 1 when it fits, else the largest that does. */
export function sheetScale(slab: { width: number; depth: number }, box: { w: number; h: number }): number {
  return Math.min(1, box.w / slab.width, box.h / slab.depth);
}

export function cautionsFor(material: keyof typeof MATERIALS, findings: { code: string }[]): string[] {
  return [
    "Hot nozzle (about 190–260 °C) and bed (up to about 110 °C): let the bed cool before lifting the slab.",
    ...(MATERIALS[material]?.styrene
      ? [`${material} gives off styrene and fine particles while printing: print in a ventilated room.`]
      : []),
    ...(findings.some((f) => f.code === "small_part")
      ? ["Small parts: not for children under 3; follow the toy-safety rules where you sell."]
      : []),
  ];
}

export async function plateMapPdf(plate: SheetPlate, url: string, paper: Paper = "a4"): Promise<Uint8Array> {
  const o = parseOptions(plate.options);
  const P = PAPERS[paper];
  const doc = await PDFDocument.create();
  doc.registerFontkit(fontkit);
  const f = fontBytes();
  const regular = await doc.embedFont(f.regular, { subset: true });
  const bold = await doc.embedFont(f.bold, { subset: true });
  const name = plateName(plate);
  doc.setTitle(`Plate map · ${name}`);
  doc.setSubject(`Plate ${plate.id}`);
  doc.setProducer("Slabwright");
  doc.setCreator("Slabwright");
  doc.setCreationDate(plate.createdAt);
  doc.setModificationDate(plate.createdAt);
  const page = doc.addPage([P.w * PT, P.h * PT]);
  const m = 12; // margin, mm
  // y runs up from the bottom edge, in mm; helpers take mm.
  const text = (s: string, x: number, y: number, size = 3.2, font: PDFFont = regular, color = ink) =>
    page.drawText(s, { x: x * PT, y: y * PT, size: size * PT, font, color });

  // Header and the sheet's own QR code (the slab's QR keeps the customer's content).
  let y = P.h - m - 6;
  text("Plate map", m, y, 6, bold);
  text(fit(name, bold, 4.2, P.w - 2 * m - 30), m, y - 6.5, 4.2, bold, muted);
  const meta = [
    `made ${plate.createdAt.toISOString().slice(0, 10)}`,
    `plate ${plate.id.slice(0, 8)}`,
    plate.templateName ? `template ${plate.templateName} v${plate.templateVersion}` : null,
    P.label,
  ]
    .filter(Boolean)
    .join(" · ");
  text(meta, m, y - 11.5, 2.8, regular, muted);
  const qrSide = 26;
  drawQr(page, url, P.w - m - qrSide, P.h - m - qrSide, qrSide);
  text("Scan to inspect", P.w - m - qrSide, P.h - m - qrSide - 3.5, 2.5, regular, muted);
  y -= 18;

  // Top view: at 1:1 when it fits here, else an overview whose scale is printed; the 1:1 pages follow.
  const box = { w: P.w - 2 * m, h: 118 };
  const L = plate.layout;
  const s = sheetScale(L.slab, box);
  const ox = m + (box.w - L.slab.width * s) / 2,
    oy = y - box.h + (box.h - L.slab.depth * s) / 2;
  drawTopView(page, plate, { ox, oy, s }, bold);
  const tileArea = { w: P.w - 2 * m, h: P.h - 2 * m - TILE_HEAD - TILE_FOOT };
  const plan = s >= 0.999 ? null : tilePlan(L.slab, tileArea);
  const pages = plan ? plan.tiles.length : 0;
  const scaleText =
    s >= 0.999
      ? "Scale 1:1 — print at 100 % (no “fit to page”)"
      : `Overview at 1:${(1 / s).toFixed(2)} (smaller than life); the slab at 1:1 is on ${pages > 1 ? `pages 2–${pages + 1}` : "page 2"}`;
  text(`${scaleText} · slab ${L.slab.width.toFixed(1)} × ${L.slab.depth.toFixed(1)} mm`, m, y - box.h - 4, 2.8, regular, muted);
  page.drawRectangle({ x: (P.w - m - 10 * s) * PT, y: (y - box.h - 3.6) * PT, width: 10 * s * PT, height: 1.2 * PT, color: ink });
  text("10 mm", P.w - m - 10 * s - 9, y - box.h - 4, 2.6, regular, muted);
  y = y - box.h - 10;

  // The table: number → part → copy, with a box to tick; columns as the pieces need.
  text("Pieces", m, y, 4, bold);
  y -= 5;
  const rowH = 4.4;
  const bottomOfTable = 62;
  const rowsPerCol = Math.max(1, Math.floor((y - bottomOfTable) / rowH) - 1);
  const cols = Math.min(3, Math.ceil(plate.pieces.length / rowsPerCol));
  const colW = (P.w - 2 * m) / Math.max(cols, 1);
  const shown = plate.pieces.slice(0, rowsPerCol * 3);
  for (let c = 0; c < cols; c++) {
    const x = m + c * colW;
    text("No.", x, y, 2.8, bold, muted);
    text("Part", x + 9, y, 2.8, bold, muted);
    text("Copy", x + colW - 20, y, 2.8, bold, muted);
    text("OK", x + colW - 8, y, 2.8, bold, muted);
  }
  shown.forEach((p, i) => {
    const c = Math.floor(i / rowsPerCol),
      r = i % rowsPerCol;
    const x = m + c * colW,
      ry = y - (r + 1) * rowH;
    text(String(p.number), x, ry, 3.2, bold);
    text(fit(p.partName, regular, 3.2, colW - 32), x + 9, ry, 3.2);
    text(String(p.copy), x + colW - 20, ry, 3.2);
    page.drawRectangle({
      x: (x + colW - 8) * PT,
      y: (ry - 0.4) * PT,
      width: 3.4 * PT,
      height: 3.4 * PT,
      borderColor: ink,
      borderWidth: 0.5,
    });
  });
  if (plate.pieces.length > shown.length)
    text(
      `… and ${plural(plate.pieces.length - shown.length, "more piece")}: see the plate's page.`,
      m,
      bottomOfTable + 1,
      2.8,
      regular,
      muted,
    );

  // Material, estimates, slicer settings, cautions.
  let by = 56;
  const e = plate.estimates;
  text("Print", m, by, 3.6, bold);
  const lines = [
    `Material ${o.material} · nozzle ${o.nozzle} mm · layer height ${o.layerHeight} mm`,
    e
      ? `Estimated ${e.totalMass.toFixed(1)} g · ${e.filamentLength.toFixed(2)} m of filament · cost ${e.cost.toFixed(2)}`
      : "Estimates: not recorded",
    `Slab ${o.slab.thickness} mm thick; pieces stand ${o.slab.gap} mm above it. Keep that air gap in the slicer (its support / raft ` +
      `gap setting), or the pieces fuse to the slab.`,
  ];
  for (const l of lines) {
    by -= 4.6;
    for (const part of wrap(l, regular, 3, P.w - 2 * m)) {
      text(part, m, by, 3);
      by -= 3.8;
    }
    by += 3.8;
  }
  if (plate.proofSummary) {
    by -= 4.6;
    for (const part of wrap(plate.proofSummary, regular, 3, P.w - 2 * m)) {
      text(part, m, by, 3);
      by -= 3.8;
    }
    by += 3.8;
  }
  by -= 7;
  text("Cautions", m, by, 3.6, bold);
  for (const c of cautionsFor(o.material, plate.findings)) {
    by -= 4.4;
    for (const part of wrap(`• ${c}`, regular, 3, P.w - 2 * m)) {
      text(part, m, by, 3);
      by -= 3.8;
    }
    by += 3.8;
  }
  text(url, m, m - 4, 2.4, regular, muted);

  // The slab at 1:1, one tile a page; neighbours overlap by TILE_OVERLAP, marked where they do.
  for (const [i, t] of (plan?.tiles ?? []).entries()) {
    const pg = doc.addPage([P.w * PT, P.h * PT]);
    const at = (str: string, x: number, yy: number, size = 3.2, font: PDFFont = regular, color = ink) =>
      pg.drawText(str, { x: x * PT, y: yy * PT, size: size * PT, font, color });
    const where = plan!.tiles.length > 1 ? ` · column ${t.column + 1} of ${plan!.columns}, row ${t.row + 1} of ${plan!.rows}` : "";
    at(`Page ${i + 2} of ${pages + 1}${where}`, m, P.h - m - 4, 4, bold);
    at(
      fit(`Plate map · ${name} · plate ${plate.id.slice(0, 8)} · ${P.label}`, regular, 2.8, P.w - 2 * m),
      m,
      P.h - m - 8.5,
      2.8,
      regular,
      muted,
    );
    // The window sits at the top left of the drawing area.
    const wx = m,
      wy = P.h - m - TILE_HEAD - t.h;
    pg.pushOperators(pushGraphicsState(), rectangle(wx * PT, wy * PT, t.w * PT, t.h * PT), clip(), endPath());
    drawTopView(pg, plate, { ox: wx - t.x0, oy: wy - t.y0, s: 1 }, bold);
    pg.pushOperators(popGraphicsState());
    cropMarks(pg, wx, wy, t.w, t.h);
    // Where a neighbour's window begins: a dashed line, and the page it is on.
    const neighbour = (dc: number, dr: number) => plan!.tiles.findIndex((o) => o.column === t.column + dc && o.row === t.row + dr);
    const right = neighbour(1, 0),
      below = neighbour(0, 1);
    if (right >= 0) {
      const nx = wx + (plan!.tiles[right]!.x0 - t.x0);
      dashed(pg, nx, wy, nx, wy + t.h);
      at(`overlap: page ${right + 2} →`, Math.min(nx + 1, wx + t.w - 22), wy - 4, 2.6, regular, muted);
    }
    if (below >= 0) {
      const ny = wy + (plan!.tiles[below]!.y0 + plan!.tiles[below]!.h - t.y0);
      dashed(pg, wx, ny, wx + t.w, ny);
      at(`overlap: page ${below + 2} ↓`, wx + 1, ny + 1, 2.6, regular, muted);
    }
    // The bar to check the print's scale with a ruler.
    const barY = m + 3;
    pg.drawRectangle({ x: m * PT, y: barY * PT, width: CHECK_BAR * PT, height: 1.2 * PT, color: ink });
    at(
      `Scale 1:1 — print at 100 % (no “fit to page”). This bar is ${CHECK_BAR} mm long; tiles overlap ${TILE_OVERLAP} mm.`,
      m + CHECK_BAR + 3,
      barY,
      2.6,
      regular,
      muted,
    );
    at(url, m, m - 4, 2.4, regular, muted);
  }
  return doc.save({ useObjectStreams: false });
}

/** Room above and below a tile for its labels and the check bar (mm). */
const TILE_HEAD = 14,
  TILE_FOOT = 12;
/** The scale-check bar on every 1:1 page (mm). */
export const CHECK_BAR = 50;

/** The slab, its marks, the pieces and their numbers, drawn at `s` with the slab's origin at (ox, oy) mm. */
function drawTopView(page: PDFPage, plate: SheetPlate, at: { ox: number; oy: number; s: number }, bold: PDFFont) {
  const { ox, oy, s } = at;
  const L = plate.layout;
  const draw = (polys: [number, number][][], color: RGB, opacity = 1) => {
    if (!polys.length) return;
    const d = polys
      .map((c) => `M${c.map(([px, py]) => `${((ox + px * s) * PT).toFixed(2)} ${(-(oy + py * s) * PT).toFixed(2)}`).join(" L")} Z`)
      .join(" ");
    // drawSvgPath flips y (SVG is y-down from the given origin): draw from the page's bottom-left.
    page.drawSvgPath(d, { x: 0, y: 0, color, opacity, borderWidth: 0 });
  };
  draw(L.slab.outline, slabFill);
  draw(L.markOutlines ?? [], markFill);
  draw(
    plate.pieces.flatMap((p) => p.outline),
    pieceFill,
    0.85,
  );
  const scaled = plate.pieces.map((p) => ({
    number: p.number,
    bounds: { minX: ox + p.bounds.minX * s, maxX: ox + p.bounds.maxX * s, minY: oy + p.bounds.minY * s, maxY: oy + p.bounds.maxY * s },
  }));
  const widthOf = (t: string, size: number) => bold.widthOfTextAtSize(t, size * PT) / PT;
  for (const l of placeLabels(scaled, widthOf)) {
    if (l.leader) {
      const [x1, y1, x2, y2] = l.leader;
      page.drawLine({ start: { x: x1 * PT, y: y1 * PT }, end: { x: x2 * PT, y: y2 * PT }, thickness: 0.25 * PT, color: ink });
      page.drawCircle({ x: x1 * PT, y: y1 * PT, size: 0.35 * PT, color: ink });
    }
    const w = widthOf(String(l.number), l.size);
    page.drawText(String(l.number), {
      x: (l.x - w / 2) * PT,
      y: (l.y - l.size * 0.36) * PT,
      size: l.size * PT,
      font: bold,
      color: l.inside ? rgb(1, 1, 1) : ink,
    });
  }
}

/** Corner marks just outside a tile's window, to cut or line up by. */
function cropMarks(page: PDFPage, x: number, y: number, w: number, h: number) {
  const len = 4,
    off = 1;
  const line = (x1: number, y1: number, x2: number, y2: number) =>
    page.drawLine({ start: { x: x1 * PT, y: y1 * PT }, end: { x: x2 * PT, y: y2 * PT }, thickness: 0.2 * PT, color: ink });
  for (const [cx, cy, dx, dy] of [
    [x, y, -1, -1],
    [x + w, y, 1, -1],
    [x, y + h, -1, 1],
    [x + w, y + h, 1, 1],
  ] as const) {
    line(cx + dx * off, cy, cx + dx * (off + len), cy);
    line(cx, cy + dy * off, cx, cy + dy * (off + len));
  }
}

function dashed(page: PDFPage, x1: number, y1: number, x2: number, y2: number) {
  page.drawLine({
    start: { x: x1 * PT, y: y1 * PT },
    end: { x: x2 * PT, y: y2 * PT },
    thickness: 0.25 * PT,
    color: muted,
    dashArray: [2 * PT, 1.5 * PT],
  });
}

function drawQr(page: PDFPage, value: string, x: number, y: number, side: number) {
  const { modules: n, runs } = qrRuns(value, "M");
  const mod = side / (n + 2 * QUIET_ZONE_MODULES);
  page.drawRectangle({ x: x * PT, y: y * PT, width: side * PT, height: side * PT, color: rgb(1, 1, 1) });
  for (const { row, start, end } of runs) {
    page.drawRectangle({
      x: (x + (QUIET_ZONE_MODULES + start) * mod) * PT,
      y: (y + side - (QUIET_ZONE_MODULES + row + 1) * mod) * PT,
      width: (end - start) * mod * PT + 0.01,
      height: mod * PT + 0.01,
      color: rgb(0, 0, 0),
    });
  }
}

function fit(s: string, font: PDFFont, size: number, widthMm: number): string {
  if (font.widthOfTextAtSize(s, size * PT) / PT <= widthMm) return s;
  let t = s;
  while (t.length > 1 && font.widthOfTextAtSize(`${t}…`, size * PT) / PT > widthMm) t = t.slice(0, -1);
  return `${t}…`;
}

function wrap(s: string, font: PDFFont, size: number, widthMm: number): string[] {
  const out: string[] = [];
  let line = "";
  for (const word of s.split(" ")) {
    const next = line ? `${line} ${word}` : word;
    if (font.widthOfTextAtSize(next, size * PT) / PT > widthMm && line) {
      out.push(line);
      line = word;
    } else line = next;
  }
  if (line) out.push(line);
  return out;
}
