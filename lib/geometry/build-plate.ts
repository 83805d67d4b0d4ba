import type { CrossSection, Manifold } from "manifold-3d";
import { runChecks, type CheckInput, type Finding } from "./checks";
import { estimate, type Estimates } from "./estimates";
import { bestPackingAngle, measureFootprint, rotatedBounds, type PartFootprint } from "./footprint";
import type { FontBook } from "./fonts";
import { write3mf } from "./io/3mf-write";
import { writeBinaryStl } from "./io/stl-write";
import type { DeflateRaw } from "./io/zip-write";
import type { Kernel, Scope } from "./kernel";
import { arrange, areaScore, type PackItem, type Packed } from "./layout";
import { qrShape, QUIET_ZONE_MODULES, type QrShape } from "./marks/qr";
import { LOGO_LIMITS, logoContours, logoHeight } from "./marks/logo";
import { layoutText, type Contour, type TextShape } from "./marks/text";
import type { IndexedMesh } from "./mesh";
import { deepestEngraving, floorUnderMarks, parseOptions, slicedGap, type Depth, type SlabOptions, type SlabOptionsInput, type TextMark } from "./options";
import { slabOutline, type ContentPoint, type SlabShape } from "./slab";
import { smallPartsFit, type CylinderFit } from "./small-parts";
import { fillPlaceholders } from "./variables";

export type PlatePart = {
  id: string;
  name: string;
  /** A closed mesh standing on z = 0 (as import and orientation leave it). */
  mesh: IndexedMesh;
  quantity: number;
};

export type BuildInput = {
  parts: PlatePart[];
  options?: SlabOptionsInput | SlabOptions;
  fonts: FontBook;
  variables?: Record<string, string>;
  /** Files to write; none for a preview or a check-only build. */
  formats?: ("stl" | "3mf")[];
  title?: string;
  deflateRaw?: DeflateRaw;
  /**
   * Parts measured by earlier builds (footprints, size, volume), kept as plain data keyed by the mesh
   * object: the slab editor and the worker threads keep their parts' meshes between builds, so a
   * change of options re-measures nothing.
   */
  cache?: PartCache;
  /** Return the marks' outlines in `layout.markOutlines` (for top views). */
  markOutlines?: boolean;
  /** For benchmarks: sees the slab and its cutters just before the one n-ary difference. */
  hooks?: { beforeBooleans?: (slab: Manifold, cutters: Manifold[]) => void };
};

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
  bounds: { minX: number; minY: number; maxX: number; maxY: number };
  /** The shadow outline on the slab (outer contours), for the plate map. */
  outline: Contour[];
  numberAt?: { x: number; y: number };
};

export type PlateLayout = {
  slab: { shape: SlabShape; width: number; depth: number; outline: Contour[]; thickness: number };
  bed: { width: number; depth: number };
  /** With `markOutlines` asked for: every mark's outline on the slab (mm, y up). */
  markOutlines?: Contour[];
  utilisation: number;
  marks: { kind: "text" | "qr" | "logo"; value: string; bounds: { minX: number; minY: number; maxX: number; maxY: number } }[];
};

export type PlateResult = {
  stl?: Uint8Array;
  threeMf?: Uint8Array;
  pieces: PlacedPiece[];
  layout: PlateLayout | null;
  findings: Finding[];
  estimates: Estimates | null;
  stats: { triangles: number; bodies: number; timings: Record<string, number> };
  /**
   * What a slicer will make of the slab and the gap at the chosen layer heights, and the floor left
   * under the deepest engraving (mm).
   */
  slicing?: { slabTop: number; pieceBase: number; gap: number; gapLayers: number; minFloor: number };
  /** Kernel-free meshes of every body, for a preview. */
  bodies?: { name: string; mesh: IndexedMesh; piece?: number }[];
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
export type PartCache = { parts: WeakMap<IndexedMesh, Map<number, PartMeasure>>; slabs: Map<string, { mesh: IndexedMesh; volume: number }> };
export const newPartCache = (): PartCache => ({ parts: new WeakMap(), slabs: new Map() });
const SLAB_ENTRIES = 4;

/** A 2 × 32-bit hash of a stream of numbers (their float64 bits), for cache keys. */
function fingerprint(feed: (add: (x: number) => void) => void): string {
  const f = new Float64Array(1), u = new Uint32Array(f.buffer);
  let h1 = 0x811c9dc5, h2 = 0x01000193;
  feed((x) => {
    f[0] = x;
    h1 = Math.imul(h1 ^ u[0]!, 0x01000193) ^ Math.imul(h2, 31);
    h2 = Math.imul(h2 ^ u[1]!, 0x85ebca6b) + (h1 >>> 7);
  });
  return `${(h1 >>> 0).toString(16)}${(h2 >>> 0).toString(16)}`;
}

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

type Work = {
  slot: number;
  part: PlatePart;
  partIndex: number;
  copy: number;
  fp: PartFootprint;
  angle: number;
  x: number;
  y: number;
  rect?: Packed;
};

type TextBlock = { mark: TextMark; value: string; shape: TextShape; x: number; y: number };
type QrBlock = { shape: QrShape; x: number; y: number; mark: NonNullable<SlabOptions["marks"]["qr"]>; value: string };

/**
 * The one entry point: parts and options in, a print-ready plate out. Every kernel object it makes is
 * tracked in one scope and freed before it returns, whatever happens.
 */
export function buildPlate(kernel: Kernel, input: BuildInput): PlateResult {
  const timings: Record<string, number> = {};
  let t0 = performance.now();
  const lap = (name: string) => {
    const t = performance.now();
    timings[name] = Math.round((t - t0) * 10) / 10;
    t0 = t;
  };
  const o = parseOptions(input.options ?? {});
  // {date} is today's date unless the caller fills it (ISO 8601, unambiguous on a label).
  const vars = { date: new Date().toISOString().slice(0, 10), ...input.variables };
  const scope = kernel.scope();
  try {
    return build(kernel, scope, input, o, vars, lap, timings);
  } finally {
    scope.close();
  }
}

function build(kernel: Kernel, scope: Scope, input: BuildInput, o: SlabOptions, vars: Record<string, string>, lap: (n: string) => void, timings: Record<string, number>): PlateResult {
  const { Manifold, CrossSection } = kernel.wasm;
  const findings: Finding[] = [];
  const m = o.slab.margin;

  // 1. Parts measured once (or taken from the cache), footprints as kernel cross-sections.
  const measures = input.parts.map((part) => measurePart(kernel, scope, part.mesh, o.layerHeight, input.cache));
  const footprints: PartFootprint[] = measures.map((pm) => ({
    shadow: scope.track(new CrossSection(pm.shadow, "Positive")),
    shadowArea: pm.shadowArea,
    contact: scope.track(new CrossSection(pm.contact, "Positive")),
    contactArea: pm.contactArea,
    hull: pm.hull,
    height: pm.height,
  }));
  lap("footprints");

  // 2. Pieces in kit order: copies, then parts, then quantity.
  const work: Work[] = [];
  for (let copy = 1; copy <= o.layout.copies; copy++) {
    input.parts.forEach((part, partIndex) => {
      for (let q = 0; q < part.quantity; q++) {
        const fp = footprints[partIndex]!;
        work.push({ slot: work.length + 1, part, partIndex, copy, fp, angle: bestPackingAngle(fp.hull), x: 0, y: 0 });
      }
    });
  }

  // Marks that need room: text lines and the QR code.
  const texts = o.marks.text.map((mark) => {
    const value = fillPlaceholders(mark.value, vars);
    return { mark, value, shape: layoutText(input.fonts[mark.font], value, mark.size) };
  });
  const qrMark = o.marks.qr;
  const qr = qrMark ? { mark: qrMark, value: fillPlaceholders(qrMark.value, vars), shape: qrShape(fillPlaceholders(qrMark.value, vars), qrMark.module, qrMark.level) } : null;
  const logoMark = o.marks.logo;
  const logo = logoMark ? { mark: logoMark, w: logoMark.width, h: logoHeight(logoMark, logoMark.width), parts: logoContours(logoMark, logoMark.width) } : null;

  if (logo) {
    const points = logo.parts.reduce((n, p) => n + p.contours.reduce((m, c) => m + c.length, 0), 0);
    if (points > LOGO_LIMITS.points) {
      findings.push({ severity: "error", code: "logo_too_complex", field: ["marks", "logo", "paths"], message: `The logo flattens to ${points.toLocaleString("en-US")} points at ${logo.w} mm; at most ${LOGO_LIMITS.points.toLocaleString("en-US")} are engraved. Simplify its curves.` });
      return { pieces: [], layout: null, findings, estimates: null, stats: { triangles: 0, bodies: 0, timings } };
    }
  }
  // Room a template gives its filled values: too long is an error that says by how much.
  for (const [i, t] of texts.entries()) {
    const width = t.shape.bounds.maxX - Math.min(0, t.shape.bounds.minX);
    if (t.mark.maxWidth !== undefined && width > t.mark.maxWidth + 1e-9) {
      findings.push({ severity: "error", code: "text_too_long", field: ["marks", "text", i, "value"], message: `"${t.value}" is ${width.toFixed(1)} mm long at ${t.mark.size} mm; its line allows ${t.mark.maxWidth} mm: ${(width - t.mark.maxWidth).toFixed(1)} mm too long. Shorten the value or make the text smaller.` });
    }
  }
  if (qr && qr.mark.maxSize !== undefined && qr.shape.sizeWithQuietZone > qr.mark.maxSize + 1e-9) {
    // The longest start of the value that still fits, found by halving.
    let lo = 0, hi = qr.value.length;
    while (lo < hi) {
      const mid = Math.ceil((lo + hi) / 2);
      if (qrShape(qr.value.slice(0, mid) || " ", qr.mark.module, qr.mark.level).sizeWithQuietZone <= qr.mark.maxSize) lo = mid;
      else hi = mid - 1;
    }
    findings.push({
      severity: "error",
      code: "qr_too_large",
      field: ["marks", "qr", "value"],
      message: `The QR code for "${qr.value.length > 60 ? `${qr.value.slice(0, 57)}…` : qr.value}" needs ${qr.shape.modules} modules, ${qr.shape.sizeWithQuietZone.toFixed(1)} mm with its quiet zone; the template allows ${qr.mark.maxSize} mm: ${(qr.shape.sizeWithQuietZone - qr.mark.maxSize).toFixed(1)} mm too large. Shorten the value by ${qr.value.length - lo} characters (or use smaller modules or a lower error correction).`,
    });
  }

  const ring = o.marks.ringStyle;
  const ext = o.marks.outlines === "ring" ? ring.clearance + ring.width : o.marks.outlines === "pocket" ? ring.clearance : 0;
  // Whatever the spacing asked, the layout keeps pieces (or their rings and pockets) at least one
  // line of the nozzle apart: closer, two pieces print as one, and the slab left between two
  // outlines is a wall too thin to print (or none at all).
  const spacing = Math.max(o.layout.spacing, o.nozzle);
  const numberFont = input.fonts[o.marks.numberStyle.font];
  const numberSize = o.marks.numberStyle.size;
  const highest = Math.max(1, work.length, ...(o.layout.pieceNumbers ?? []));
  const labelW = o.marks.numbers ? layoutText(numberFont, String(highest), numberSize).advance : 0;
  const gutter = o.marks.numbers ? labelW + 0.8 : 0;

  // A band above or below the pieces: the logo at the left, then the text lines, the QR at the right.
  const bandOf = (where: "top" | "bottom") => {
    const inBand = (p: SlabOptions["marks"]["text"][number]["position"]) => p === where || (where === "bottom" && p === "auto");
    const lines = texts.filter((t) => inBand(t.mark.position));
    const q = qr && inBand(qr.mark.position) ? qr : null;
    const lg = logo && inBand(logo.mark.position) ? logo : null;
    const textH = lines.reduce((s, t, i) => s + t.mark.size * (i === 0 ? 1 : 1.6), 0) + (lines.length ? 0.4 * (lines[lines.length - 1]!.mark.size) : 0);
    const textW = Math.max(0, ...lines.map((t) => t.shape.bounds.maxX - Math.min(0, t.shape.bounds.minX)));
    const qrSide = q ? q.shape.sizeWithQuietZone : 0;
    const h = Math.max(textH, qrSide, lg?.h ?? 0);
    const items = [lg?.w ?? 0, textW, qrSide].filter((x) => x > 0);
    const w = items.reduce((a, b) => a + b, 0) + spacing * Math.max(0, items.length - 1);
    const logoW = lg ? lg.w + spacing : 0;
    return { lines, q, lg, h, w, textH, logoW };
  };
  const bottom = bandOf("bottom");
  const top = bandOf("top");
  const bandsH = (bottom.h ? bottom.h + spacing : 0) + (top.h ? top.h + spacing : 0);
  const bandsW = Math.max(bottom.w, top.w);
  lap("marks layout");

  // 3. Layout.
  const maxW = o.layout.bed.width - 2 * m;
  const maxH = o.layout.bed.depth - 2 * m - bandsH;
  const fixed = new Map((o.layout.placements ?? []).map((p) => [p.piece, p]));
  // A piece's rectangle holds its shadow, its ring and, on the left, its number; the packer may also
  // take it turned a quarter (the gutter stays on the left, so that is a different size, not a swap).
  const sizeAt = (w: Work, angle: number): [number, number] => {
    const rb = rotatedBounds(w.fp.hull, angle);
    return [rb.w + 2 * ext + gutter, Math.max(rb.h + 2 * ext, o.marks.numbers ? numberSize + 0.6 : 0)];
  };
  const itemOf = (w: Work): PackItem => ({ key: w.slot, sizes: [sizeAt(w, w.angle), sizeAt(w, w.angle + 90)] });
  const auto = work.filter((w) => !fixed.has(w.slot));
  const manual = work.filter((w) => fixed.has(w.slot));
  for (const w of manual) {
    const p = fixed.get(w.slot)!;
    w.angle = p.rotation;
    w.x = p.x;
    w.y = p.y;
  }
  if (auto.length) {
    // Hand-placed pieces keep their places; the rest are packed to their right.
    const manualMaxX = manual.length ? Math.max(...manual.map((w) => pieceBounds(w).maxX)) - m + spacing : 0;
    // Rate a candidate by the slab it leads to: the pieces' block with the bands above and below it;
    // for a disc, the diagonal of that whole block (the circle around it), else its area.
    const score = (w: number, h: number) => {
      const W = Math.max(w + manualMaxX, bandsW), H = h + bandsH;
      return o.slab.shape === "disc" ? Math.hypot(W, H) : areaScore(W, H);
    };
    const found = arrange(auto.map(itemOf), maxW - manualMaxX, maxH, spacing, score);
    if (!found || texts.some((t) => t.shape.bounds.maxX - t.shape.bounds.minX > maxW) || bandsW > maxW || maxH <= 0) {
      const needW = Math.max(bandsW, ...auto.map((w) => Math.min(...itemOf(w).sizes.map((d) => d[0]))));
      findings.push({
        severity: "error",
        code: "does_not_fit",
        field: ["layout", "bed"],
        message: `The pieces and marks do not fit a ${o.layout.bed.width} × ${o.layout.bed.depth} mm bed with ${m} mm margins${needW > maxW ? ` (the widest row needs ${needW.toFixed(1)} mm, ${(needW - maxW).toFixed(1)} mm more than there is)` : ""}. Use a bigger bed, fewer copies, or split the kit over two plates.`,
      });
      for (const [i, t] of texts.entries()) {
        const width = t.shape.bounds.maxX - t.shape.bounds.minX;
        if (width > maxW) findings.push({ severity: "error", code: "text_too_long", field: ["marks", "text", i, "value"], message: `"${t.value}" is ${width.toFixed(1)} mm long at ${t.mark.size} mm; the bed leaves ${maxW.toFixed(1)} mm: ${(width - maxW).toFixed(1)} mm too long. Shorten it or make it smaller.` });
      }
      lap("layout");
      return { pieces: [], layout: null, findings, estimates: null, stats: { triangles: 0, bodies: 0, timings } };
    }
    const baseY = m + (bottom.h ? bottom.h + spacing : 0);
    // With no piece placed by hand, a block of pieces narrower than the text and QR bands is centred
    // over them: the slab looks balanced and a disc round it comes out smaller.
    const centre = manual.length === 0 ? Math.max(0, (bandsW - found.width) / 2) : 0;
    for (const p of found.packed) {
      const w = work[p.key - 1]!;
      if (p.choice === 1) w.angle = (w.angle + 90) % 360;
      const rb = rotatedBounds(w.fp.hull, w.angle);
      w.rect = { ...p, x: p.x + m + manualMaxX + centre, y: p.y + baseY };
      w.x = w.rect.x + gutter + ext - rb.minX;
      w.y = w.rect.y + ext - rb.minY;
    }
  }
  lap("layout");

  // Numbers: reading order of the pieces' centres (or the numbers asked for, in kit order).
  const numbering = numberPieces(work.map((w) => ({ slot: w.slot, box: pieceBounds(w) })), o.layout.pieceNumbers);
  if ("error" in numbering) {
    findings.push(numbering.error);
    return { pieces: [], layout: null, findings, estimates: null, stats: { triangles: 0, bodies: 0, timings } };
  }
  const numberOf = numbering.numbers;
  // Each number's glyphs, at the top left of its piece's ring box and never below its bottom: they
  // are content the slab is built around, like the pieces and the bands.
  const numberGlyphs = new Map<number, { shape: TextShape; x: number; y: number; box: { minX: number; minY: number; maxX: number; maxY: number } }>();
  if (o.marks.numbers) {
    for (const w of work) {
      const b = pieceBounds(w);
      const shape = layoutText(numberFont, String(numberOf.get(w.slot)!), numberSize);
      const x = b.minX - ext - gutter - Math.min(0, shape.bounds.minX);
      const y = Math.max(b.maxY + ext, b.minY - ext + numberSize + 0.6) - numberSize - 0.3;
      numberGlyphs.set(w.slot, { shape, x, y, box: { minX: x + shape.bounds.minX, minY: y + shape.bounds.minY, maxX: x + shape.bounds.maxX, maxY: y + shape.bounds.maxY } });
    }
  }

  // Content extent: pieces (with their rings and numbers) and the bands.
  const contentMinX = m;
  const piecesBox = work.map((w) => {
    const b = pieceBounds(w);
    const box = { minX: b.minX - ext - gutter, minY: b.minY - ext, maxX: b.maxX + ext, maxY: b.maxY + ext };
    const g = numberGlyphs.get(w.slot)?.box;
    return g ? { minX: Math.min(box.minX, g.minX), minY: Math.min(box.minY, g.minY), maxX: Math.max(box.maxX, g.maxX), maxY: Math.max(box.maxY, g.maxY) } : box;
  });
  const piecesMaxX = Math.max(m, ...piecesBox.map((b) => b.maxX));
  const piecesMinY = Math.min(...piecesBox.map((b) => b.minY), m + (bottom.h ? bottom.h + spacing : 0));
  const piecesMaxY = Math.max(m, ...piecesBox.map((b) => b.maxY));
  const innerW = Math.max(piecesMaxX - contentMinX, bandsW);
  const bottomY = Math.min(m, piecesMinY - spacing - bottom.h);
  const topY = piecesMaxY + (top.h ? spacing : 0);

  // Text and QR places inside the bands: text left-aligned, the QR at the right.
  const blocks: TextBlock[] = [];
  const placeBand = (band: typeof bottom, y0: number) => {
    let y = y0 + band.h - (band.lines[0]?.mark.size ?? 0) - Math.max(0, (band.h - band.textH) / 2);
    band.lines.forEach((t, i) => {
      if (i > 0) y -= t.mark.size * 1.6;
      // On a disc the lines are centred (in the room the QR leaves), which keeps the disc small.
      const room = innerW - band.logoW - (band.q ? band.q.shape.sizeWithQuietZone + spacing : 0);
      const width = t.shape.bounds.maxX - Math.min(0, t.shape.bounds.minX);
      const indent = o.slab.shape === "disc" ? Math.max(0, (room - width) / 2) : 0;
      blocks.push({ mark: t.mark, value: t.value, shape: t.shape, x: contentMinX + band.logoW + indent - Math.min(0, t.shape.bounds.minX), y });
    });
  };
  placeBand(bottom, bottomY);
  placeBand(top, topY);
  let logoBlock: { x: number; y: number; w: number; h: number } | null = null;
  if (logo) {
    const pos = logo.mark.position;
    const band = pos === "top" ? top : bottom;
    logoBlock = typeof pos === "object" ? { x: pos.x, y: pos.y, w: logo.w, h: logo.h } : { x: contentMinX, y: (pos === "top" ? topY : bottomY) + (band.h - logo.h) / 2, w: logo.w, h: logo.h };
  }
  for (const t of texts) {
    if (typeof t.mark.position === "object") blocks.push({ mark: t.mark, value: t.value, shape: t.shape, x: t.mark.position.x, y: t.mark.position.y });
  }
  let qrBlock: QrBlock | null = null;
  if (qr) {
    const side = qr.shape.sizeWithQuietZone;
    const pos = qr.mark.position;
    const qx = typeof pos === "object" ? pos.x : contentMinX + innerW - side;
    const qy = typeof pos === "object" ? pos.y : pos === "top" ? topY + top.h - side : bottomY;
    qrBlock = { shape: qr.shape, x: qx, y: qy, mark: qr.mark, value: qr.value };
  }

  // 4. The slab outline around everything, with the margin.
  const contentBoxes = [
    ...piecesBox,
    ...blocks.map((b) => ({ minX: b.x + b.shape.bounds.minX, minY: b.y + b.shape.bounds.minY, maxX: b.x + b.shape.bounds.maxX, maxY: b.y + b.shape.bounds.maxY })),
    ...(qrBlock ? [{ minX: qrBlock.x, minY: qrBlock.y, maxX: qrBlock.x + qrBlock.shape.sizeWithQuietZone, maxY: qrBlock.y + qrBlock.shape.sizeWithQuietZone }] : []),
    ...(logoBlock ? [{ minX: logoBlock.x, minY: logoBlock.y, maxX: logoBlock.x + logoBlock.w, maxY: logoBlock.y + logoBlock.h }] : []),
  ];
  // What the slab must hold with its margin: each piece's hull grown by its ring, every box's corners.
  const points: ContentPoint[] = [
    ...work.flatMap((w) => hullAt(w).map(([x, y]) => ({ x, y, clearance: ext }))),
    ...contentBoxes.flatMap((b) => [[b.minX, b.minY], [b.maxX, b.minY], [b.minX, b.maxY], [b.maxX, b.maxY]].map(([x, y]) => ({ x: x!, y: y!, clearance: 0 }))),
  ];
  const shaped = slabOutline(kernel, scope, o, {
    boxes: contentBoxes,
    points,
    pieceShadows: work.map((w) => placedShadow(scope, w)),
    ext,
  });
  const outline = shaped.outline;
  if (shaped.note) findings.push(shaped.note);
  // Shift everything so the slab sits in the positive quadrant from (0, 0).
  const ob = outline.bounds();
  const dx = -ob.min[0], dy = -ob.min[1];
  const slabCs = scope.track(outline.translate(dx, dy));
  for (const w of work) {
    w.x += dx;
    w.y += dy;
  }
  for (const b of blocks) {
    b.x += dx;
    b.y += dy;
  }
  if (qrBlock) {
    qrBlock.x += dx;
    qrBlock.y += dy;
  }
  if (logoBlock) {
    logoBlock.x += dx;
    logoBlock.y += dy;
  }
  for (const g of numberGlyphs.values()) {
    g.x += dx;
    g.y += dy;
    g.box = { minX: g.box.minX + dx, minY: g.box.minY + dy, maxX: g.box.maxX + dx, maxY: g.box.maxY + dy };
  }
  const slabW = ob.max[0] - ob.min[0];
  const slabD = ob.max[1] - ob.min[1];
  lap("slab outline");

  // 5. Marks as cutters (engraved) or additions (embossed), grouped by depth.
  // Every engraving leaves its floor: too deep is refused at its field, "max" is as deep as allowed.
  const deepest = deepestEngraving(o);
  const floor = floorUnderMarks(o);
  const depthOf = (relief: "engrave" | "emboss", depth: Depth, field: (string | number)[], what: string): number => {
    if (relief === "emboss") {
      if (depth === "max") {
        findings.push({ severity: "error", code: "emboss_needs_height", field, message: `The ${what} is embossed: give it a height in mm ("as deep as allowed" is for engraving).` });
        return 0.4;
      }
      return depth;
    }
    if (deepest < 0.1 - 1e-9) {
      findings.push({
        severity: "error",
        code: "slab_too_thin_to_engrave",
        field,
        message: `The ${what} cannot be engraved in a ${o.slab.thickness} mm slab: every engraving must leave ${floor.toFixed(2)} mm under it (two ${o.layerHeight} mm layers, and never under 0.4 mm). Make the slab at least ${(floor + 0.2).toFixed(1)} mm thick, or emboss the mark.`,
      });
      return 0.1;
    }
    if (depth === "max") return deepest;
    if (depth > deepest + 1e-9) {
      findings.push({
        severity: "error",
        code: "mark_too_deep",
        field,
        message: `The ${what} is engraved ${depth} mm deep in a ${o.slab.thickness} mm slab, leaving ${Math.max(0, o.slab.thickness - depth).toFixed(2)} mm under it; every engraving must leave ${floor.toFixed(2)} mm (two ${o.layerHeight} mm layers, and never under 0.4 mm). Make it at most ${deepest.toFixed(2)} mm deep (${(depth - deepest).toFixed(2)} mm less), thicken the slab to ${(depth + floor).toFixed(1)} mm, or choose "as deep as allowed".`,
      });
    }
    return depth;
  };
  // Rings, pockets and numbers left to their default are engraved two layers' worth (0.4 mm, common
  // practice) or as deep as a thinner slab allows.
  const ownDepth = (d: Depth | undefined): Depth => d ?? (deepest >= 0.1 ? Math.min(0.4, Math.round(deepest * 1e6) / 1e6) : 0.4);
  const ringDepth = o.marks.outlines === "none" ? 0 : depthOf("engrave", ownDepth(ring.depth), ["marks", "ringStyle", "depth"], o.marks.outlines === "pocket" ? "pocket under each piece" : "outline ring under each piece");
  const numberDepth = o.marks.numbers ? depthOf("engrave", ownDepth(o.marks.numberStyle.depth), ["marks", "numberStyle", "depth"], "piece numbers") : 0;
  const lift = o.slab.thickness + o.slab.gap - (o.marks.outlines === "pocket" ? ringDepth : 0);
  const engrave = new Map<number, CrossSection[]>();
  const emboss = new Map<number, CrossSection[]>();
  const add = (relief: "engrave" | "emboss", depth: number, cs: CrossSection) => {
    const map = relief === "engrave" ? engrave : emboss;
    const list = map.get(depth) ?? [];
    list.push(cs);
    map.set(depth, list);
  };
  const textCs = (contours: Contour[], x: number, y: number) => scope.track(scope.track(new CrossSection(contours, "NonZero")).translate(x, y));
  const markRegions: CheckInput["marks"] = [];
  for (const b of blocks) {
    if (b.shape.contours.length === 0) continue;
    const cs = textCs(b.shape.contours, b.x, b.y);
    const line = o.marks.text.indexOf(b.mark);
    add(b.mark.relief, depthOf(b.mark.relief, b.mark.depth, ["marks", "text", line, "depth"], `text line ${line + 1} ("${b.value}")`), cs);
    markRegions.push({ kind: "text", label: `"${b.value}"`, cs, relief: b.mark.relief, field: ["marks", "text", line, "size"] });
  }
  if (qrBlock) {
    const inset = QUIET_ZONE_MODULES * qrBlock.mark.module;
    const cs = textCs(qrBlock.shape.contours, qrBlock.x + inset, qrBlock.y + inset);
    add(qrBlock.mark.relief, depthOf(qrBlock.mark.relief, qrBlock.mark.depth, ["marks", "qr", "depth"], "QR code"), cs);
  }
  if (logo && logoBlock) {
    const pieces = logo.parts.filter((p) => p.contours.length).map((p) => scope.track(new CrossSection(p.contours, p.fillRule === "evenodd" ? "EvenOdd" : "NonZero")));
    if (pieces.length) {
      const cs = scope.track(scope.track(CrossSection.union(pieces)).translate(logoBlock.x, logoBlock.y));
      add(logo.mark.relief, depthOf(logo.mark.relief, logo.mark.depth, ["marks", "logo", "depth"], `logo ${logo.mark.name}`), cs);
      markRegions.push({ kind: "logo", label: logo.mark.name, cs, relief: logo.mark.relief, field: ["marks", "logo", "width"] });
    }
  }
  const placed: PlacedPiece[] = [];
  const rings: CrossSection[] = [];
  for (const w of work) {
    const shadow = placedShadow(scope, w);
    const n = numberOf.get(w.slot)!;
    const b = pieceBounds(w);
    let numberAt: { x: number; y: number } | undefined;
    const glyphs = numberGlyphs.get(w.slot);
    if (glyphs) {
      numberAt = { x: glyphs.box.minX, y: glyphs.y };
      const cs = textCs(glyphs.shape.contours, glyphs.x, glyphs.y);
      add("engrave", numberDepth, cs);
      markRegions.push({ kind: "number", label: `number ${n}`, cs, relief: "engrave", field: ["marks", "numberStyle", "size"] });
    }
    if (o.marks.outlines === "ring") {
      const outer = scope.track(shadow.offset(ring.clearance + ring.width, "Round", 2, 48));
      const inner = scope.track(shadow.offset(ring.clearance, "Round", 2, 48));
      const cs = scope.track(scope.track(outer.subtract(inner)).simplify(0.005));
      add("engrave", ringDepth, cs);
      rings.push(cs);
    } else if (o.marks.outlines === "pocket") {
      add("engrave", ringDepth, scope.track(scope.track(shadow.offset(ring.clearance, "Round", 2, 48)).simplify(0.005)));
    }
    placed.push({
      number: n,
      slot: w.slot,
      partId: w.part.id,
      partName: w.part.name,
      copy: w.copy,
      x: w.x,
      y: w.y,
      rotation: w.angle,
      z: lift,
      height: w.fp.height,
      shadowArea: w.fp.shadowArea,
      contactArea: w.fp.contactArea,
      bounds: b,
      outline: shadow.toPolygons(),
      numberAt,
    });
  }
  placed.sort((a, b) => a.number - b.number);
  // The marks' outlines seen from above (text, QR, logo, numbers, rings), for top views and sheets.
  let markOutlines: Contour[] | undefined;
  if (input.markOutlines) {
    const all = [...engrave.values(), ...emboss.values()].flat();
    markOutlines = all.length ? scope.track(CrossSection.union(all)).toPolygons() : [];
  }
  lap("marks");

  // 6. Checks, before the expensive booleans: an error stops the build here.
  const pieceShadows = work.map((w) => ({ number: numberOf.get(w.slot)!, cs: placedShadow(scope, w), w }));
  findings.push(
    ...runChecks(kernel, scope, {
      options: o,
      slab: slabCs,
      slabSize: { width: slabW, depth: slabD },
      pieces: pieceShadows.map((p) => ({ number: p.number, shadow: p.cs, name: p.w.part.name, height: p.w.fp.height, contactArea: p.w.fp.contactArea, partId: p.w.part.id, bounds: pieceBounds(p.w), ringExt: ext })),
      marks: markRegions,
      allMarks: [...engrave.values(), ...emboss.values()].flat(),
      texts: blocks,
      qr: qrBlock,
      unfilled: [...o.marks.text.map((t) => fillPlaceholders(t.value, vars)), qr?.value ?? ""].flatMap((v) => [...v.matchAll(/\{([a-z][a-z0-9_]*)\}/gi)].map((x) => x[0])),
      solids: input.parts.map((p, i) => ({ partId: p.id, name: p.name, size: measures[i]!.size, smallParts: measures[i]!.smallParts })),
    }),
  );
  lap("checks");
  const sliced = slicedGap(o);
  const slicing = { slabTop: sliced.slabTop, pieceBase: sliced.pieceBase, gap: sliced.gap, gapLayers: sliced.layers, minFloor: o.slab.thickness - Math.max(0, ...engrave.keys()) };

  const layout: PlateLayout = {
    slab: { shape: o.slab.shape, width: slabW, depth: slabD, outline: slabCs.toPolygons(), thickness: o.slab.thickness },
    bed: o.layout.bed,
    ...(markOutlines ? { markOutlines } : {}),
    utilisation: work.reduce((s, w) => s + w.fp.shadowArea, 0) / slabCs.area(),
    marks: [
      ...blocks.map((b) => ({ kind: "text" as const, value: b.value, bounds: { minX: b.x + b.shape.bounds.minX, minY: b.y + b.shape.bounds.minY, maxX: b.x + b.shape.bounds.maxX, maxY: b.y + b.shape.bounds.maxY } })),
      ...(qrBlock ? [{ kind: "qr" as const, value: qrBlock.value, bounds: { minX: qrBlock.x, minY: qrBlock.y, maxX: qrBlock.x + qrBlock.shape.sizeWithQuietZone, maxY: qrBlock.y + qrBlock.shape.sizeWithQuietZone } }] : []),
      ...(logoBlock && logo ? [{ kind: "logo" as const, value: logo.mark.name, bounds: { minX: logoBlock.x, minY: logoBlock.y, maxX: logoBlock.x + logoBlock.w, maxY: logoBlock.y + logoBlock.h } }] : []),
    ],
  };
  if (findings.some((f) => f.severity === "error")) {
    return { pieces: placed, layout, findings, estimates: null, stats: { triangles: 0, bodies: 0, timings }, slicing };
  }

  // 7. The slab solid: one n-ary difference with every cutter, then embossed marks joined on.
  const slabKey = input.cache
    ? fingerprint((add) => {
        add(o.slab.thickness);
        const polys = (cs: CrossSection) => {
          for (const c of cs.toPolygons()) {
            add(c.length);
            for (const [x, y] of c) (add(x), add(y));
          }
        };
        polys(slabCs);
        for (const [tag, map] of [[1, engrave], [2, emboss]] as const) {
          for (const [depth, list] of map) {
            add(tag);
            add(depth);
            for (const cs of list) (add(-1), polys(cs));
          }
        }
      })
    : undefined;
  const kept = slabKey ? input.cache!.slabs.get(slabKey) : undefined;
  let slabMesh: IndexedMesh;
  let slabVolume: number;
  if (kept) {
    slabMesh = { vertProperties: kept.mesh.vertProperties.slice(), triVerts: kept.mesh.triVerts.slice() };
    slabVolume = kept.volume;
  } else {
    const slabBase = scope.track(slabCs.extrude(o.slab.thickness));
    const cutters: Manifold[] = [];
    const overshoot = 0.01;
    for (const [depth, list] of engrave) {
      const cs = scope.track(CrossSection.union(list));
      cutters.push(scope.track(scope.track(cs.extrude(depth + overshoot)).translate(0, 0, o.slab.thickness - depth)));
    }
    input.hooks?.beforeBooleans?.(slabBase, cutters);
    let slab = cutters.length ? scope.track(Manifold.difference([slabBase, ...cutters])) : slabBase;
    const adds: Manifold[] = [];
    for (const [depth, list] of emboss) {
      const cs = scope.track(CrossSection.union(list));
      adds.push(scope.track(scope.track(cs.extrude(depth)).translate(0, 0, o.slab.thickness)));
    }
    if (adds.length) slab = scope.track(Manifold.union([slab, ...adds]));
    slabMesh = toIndexed(slab.getMesh());
    slabVolume = slab.volume();
    if (slabKey) {
      const slabs = input.cache!.slabs;
      if (slabs.size >= SLAB_ENTRIES) slabs.delete(slabs.keys().next().value!);
      slabs.set(slabKey, { mesh: { vertProperties: slabMesh.vertProperties.slice(), triVerts: slabMesh.triVerts.slice() }, volume: slabVolume });
    }
  }
  lap("slab booleans");

  // Pieces: the part's own welded mesh turned and moved in plain arithmetic (no kernel round trip).
  const pieceMeshes = placed.map((p) => ({ piece: p, mesh: placeMesh(input.parts.find((x) => x.id === p.partId)!.mesh, p.rotation, p.x, p.y, p.z) }));
  lap("pieces");

  const bodies: { name: string; mesh: IndexedMesh; piece?: number }[] = [{ name: "Slab", mesh: slabMesh }, ...pieceMeshes.map(({ piece, mesh }) => ({ name: `${piece.number} · ${piece.partName}`, mesh, piece: piece.number }))];
  const formats = input.formats ?? [];
  let stl: Uint8Array | undefined;
  let threeMf: Uint8Array | undefined;
  if (formats.includes("stl")) {
    stl = writeBinaryStl(bodies.map((b) => b.mesh));
    lap("stl");
  }
  if (formats.includes("3mf")) {
    threeMf = write3mf(
      bodies.map((b) => ({ name: b.name, mesh: b.mesh, partNumber: b.piece ? String(b.piece) : "slab" })),
      {
        title: input.title ?? "Slabwright plate",
        description: `${placed.length} pieces on a ${o.slab.thickness} mm slab, ${o.slab.gap} mm air gap`,
        // The plate's own day ({date}), so the same inputs give the same bytes on any later day.
        ...(/^\d{4}-\d{2}-\d{2}$/.test(vars.date ?? "") ? { creationDate: new Date(`${vars.date}T00:00:00Z`) } : {}),
      },
      input.deflateRaw,
    );
    lap("3mf");
  }
  const estimates = estimate(o, slabVolume, placed.map((p) => ({ number: p.number, volume: measures[input.parts.findIndex((x) => x.id === p.partId)]!.volume })));
  const triangles = bodies.reduce((s, b) => s + b.mesh.triVerts.length / 3, 0);
  return { stl, threeMf, pieces: placed, layout, findings, estimates, stats: { triangles, bodies: bodies.length, timings }, slicing, bodies };

  function hullAt(w: Work): [number, number][] {
    const r = (w.angle * Math.PI) / 180, c = Math.cos(r), sn = Math.sin(r);
    return w.fp.hull.map(([x, y]) => [c * x - sn * y + w.x, sn * x + c * y + w.y]);
  }

  function pieceBounds(w: Work) {
    const rb = rotatedBounds(w.fp.hull, w.angle);
    return { minX: w.x + rb.minX, minY: w.y + rb.minY, maxX: w.x + rb.maxX, maxY: w.y + rb.maxY };
  }
}

function placedShadow(scope: Scope, w: Work): CrossSection {
  return scope.track(scope.track(w.fp.shadow.rotate(w.angle)).translate(w.x, w.y));
}

function toIndexed(mesh: { vertProperties: Float32Array; triVerts: Uint32Array; numProp: number }): IndexedMesh {
  if (mesh.numProp === 3) return { vertProperties: mesh.vertProperties.slice(), triVerts: mesh.triVerts.slice() };
  const n = mesh.vertProperties.length / mesh.numProp;
  const out = new Float32Array(n * 3);
  for (let i = 0; i < n; i++) for (let a = 0; a < 3; a++) out[i * 3 + a] = mesh.vertProperties[i * mesh.numProp + a]!;
  return { vertProperties: out, triVerts: mesh.triVerts.slice() };
}

/** Turn a mesh about Z by `deg` and move it to (x, y, z). */
export function placeMesh(mesh: IndexedMesh, deg: number, x: number, y: number, z: number): IndexedMesh {
  const r = (deg * Math.PI) / 180, c = Math.cos(r), s = Math.sin(r);
  const p = mesh.vertProperties;
  const out = new Float32Array(p.length);
  for (let i = 0; i < p.length; i += 3) {
    const px = p[i]!, py = p[i + 1]!;
    out[i] = c * px - s * py + x;
    out[i + 1] = s * px + c * py + y;
    out[i + 2] = p[i + 2]! + z;
  }
  return { vertProperties: out, triVerts: mesh.triVerts };
}

type Box2 = { minX: number; minY: number; maxX: number; maxY: number };

/**
 * Piece numbers in reading order: rows from the top down, each left to right by the pieces' centres.
 * A piece is in a row when its centre lies within the height of the row's first piece, or that
 * piece's centre within its own height (so a short piece beside a tall one reads in its row). The
 * numbers depend only on where the pieces are, so any change that leaves them in place keeps them.
 * `given` (in kit order) replaces them, as a reprint keeps its pieces' numbers.
 */
export function numberPieces(items: { slot: number; box: Box2 }[], given?: number[]): { numbers: Map<number, number> } | { error: Finding } {
  if (given) {
    const dup = given.find((n, i) => given.indexOf(n) !== i);
    if (given.length !== items.length || dup !== undefined) {
      return {
        error: {
          severity: "error",
          code: "piece_numbers_mismatch",
          field: ["layout", "pieceNumbers"],
          message: dup !== undefined ? `Piece number ${dup} is given twice in layout.pieceNumbers; each piece needs its own.` : `layout.pieceNumbers lists ${given.length} numbers for ${items.length} pieces; give exactly one per piece, in kit order.`,
        },
      };
    }
    return { numbers: new Map(items.map((it, i) => [it.slot, given[i]!])) };
  }
  const cy = (b: Box2) => (b.minY + b.maxY) / 2, cx = (b: Box2) => (b.minX + b.maxX) / 2;
  const order = [...items].sort((a, b) => cy(b.box) - cy(a.box) || cx(a.box) - cx(b.box) || a.slot - b.slot);
  const rows: { anchor: Box2; members: typeof items }[] = [];
  for (const it of order) {
    const row = rows.find((r) => (cy(it.box) >= r.anchor.minY && cy(it.box) <= r.anchor.maxY) || (cy(r.anchor) >= it.box.minY && cy(r.anchor) <= it.box.maxY));
    if (row) row.members.push(it);
    else rows.push({ anchor: it.box, members: [it] });
  }
  const read = rows.flatMap((r) => r.members.sort((a, b) => cx(a.box) - cx(b.box) || a.slot - b.slot));
  return { numbers: new Map(read.map((it, i) => [it.slot, i + 1])) };
}
