import { readFileSync } from "node:fs";
import path from "node:path";
import fontkit from "@pdf-lib/fontkit";
import { PDFDocument, rgb, type PDFFont, type PDFPage } from "pdf-lib";
import type { PlacedPiece, PlateLayout } from "@/lib/geometry/build-plate";
import type { Estimates } from "@/lib/geometry/estimates";
import { qrRuns, QUIET_ZONE_MODULES } from "@/lib/geometry/marks/qr";
import { MATERIALS, parseOptions } from "@/lib/geometry/options";

/**
 * The plate map sheet as PDF (pdf-lib): the slab's top view to scale (1:1 when it fits the paper,
 * else the scale is printed beside a 10 mm bar), each piece's outline and number, the table
 * number → part → copy with a box to tick, the sheet's own QR code to the plate's page in the app,
 * material, estimates, the slicer settings the plate assumes, and the cautions. One page per plate.
 */

export const PAPERS = { a4: { w: 210, h: 297, label: "A4" }, letter: { w: 215.9, h: 279.4, label: "Letter" } } as const;
export type Paper = keyof typeof PAPERS;

export type SheetPlate = {
  id: string;
  title: string | null;
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
  doc.setTitle(`Plate map · ${plate.title ?? "plate"}`);
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
  text(plate.title ?? "Plate", m, y - 6.5, 4.2, bold, muted);
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

  // Top view, to scale.
  const box = { w: P.w - 2 * m, h: 118 };
  const L = plate.layout;
  const s = sheetScale(L.slab, box);
  const ox = m + (box.w - L.slab.width * s) / 2,
    oy = y - box.h + (box.h - L.slab.depth * s) / 2;
  const draw = (polys: [number, number][][], color: ReturnType<typeof rgb>, opacity = 1) => {
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
  for (const p of plate.pieces) {
    const cx = ox + ((p.bounds.minX + p.bounds.maxX) / 2) * s,
      cy = oy + ((p.bounds.minY + p.bounds.maxY) / 2) * s;
    const label = String(p.number);
    const size = Math.max(2.2, Math.min(5, ((p.bounds.maxX - p.bounds.minX) * s) / 2.5));
    const w = bold.widthOfTextAtSize(label, size * PT) / PT;
    page.drawText(label, { x: (cx - w / 2) * PT, y: (cy - size * 0.36) * PT, size: size * PT, font: bold, color: rgb(1, 1, 1) });
  }
  const scaleText =
    s >= 0.999 ? "Scale 1:1 — print at 100 % (no “fit to page”)" : `Scale 1:${(1 / s).toFixed(2)} — the slab is larger than the paper`;
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
    text(`… and ${plate.pieces.length - shown.length} more pieces: see the plate's page.`, m, bottomOfTable + 1, 2.8, regular, muted);

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
  return doc.save({ useObjectStreams: false });
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
