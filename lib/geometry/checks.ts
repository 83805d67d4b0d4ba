import type { CrossSection } from "manifold-3d";
import type { Kernel, Scope } from "./kernel";
import type { QrShape } from "./marks/qr";
import { MATERIALS, slicedGap, type SlabOptions } from "./options";
import type { CylinderFit } from "./small-parts";

export type Severity = "error" | "warning" | "info";
/**
 * One thing the checks found. `field`, where an option is the cause, is its path in the options
 * (as zod reports a path: ["marks", "text", 0, "depth"]), so a form shows the finding at that field.
 */
export type Finding = {
  severity: Severity;
  code: FindingCode;
  message: string;
  piece?: number;
  pieces?: number[];
  field?: (string | number)[];
};

/**
 * Every code a finding can carry, by the stage that raises it, so a caller outside the engine
 * compares codes with type checking (`f.code === "small_part"`; a misspelt code does not compile).
 */
export type FindingCode =
  // The parts as read (units.ts), before anything is built.
  | "units_suspect"
  | "part_too_small"
  | "part_larger_than_bed"
  // The marks' shapes and the room a template gives them.
  | "logo_too_complex"
  | "text_too_long"
  | "text_shrunk"
  | "qr_too_large"
  // The layout on the bed.
  | "does_not_fit"
  | "piece_numbers_mismatch"
  | "plate_pieces_unknown"
  // The slab's outline.
  | "corners_grow_slab"
  | "corner_radius_limited"
  // Engraving depths and embossing heights.
  | "emboss_needs_height"
  | "slab_too_thin_to_engrave"
  | "mark_too_deep"
  // The laid-out plate (runChecks).
  | "slab_outside_bed"
  | "piece_outside_bed"
  | "pieces_overlap"
  | "pieces_fuse"
  | "pieces_too_close"
  | "off_slab"
  | "contact_too_small"
  | "tip_over_risk"
  | "mark_collides"
  | "qr_quiet_zone"
  | "qr_module_too_small"
  | "ring_too_narrow"
  | "stroke_too_thin"
  | "sharp_corners"
  | "gap_out_of_range"
  | "gap_sliced_away"
  | "gap_below_layer"
  | "gap_sliced"
  | "thickness_sliced"
  | "small_part"
  | "unfilled_placeholder";

type Box = { minX: number; minY: number; maxX: number; maxY: number };

export type CheckInput = {
  options: SlabOptions;
  slab: CrossSection;
  slabSize: { width: number; depth: number };
  pieces: {
    number: number;
    shadow: CrossSection;
    name: string;
    height: number;
    contactArea: number;
    partId: string;
    bounds: Box;
    ringExt: number;
  }[];
  marks: {
    kind: "text" | "qr" | "number" | "logo";
    label: string;
    cs: CrossSection;
    relief: "engrave" | "emboss";
    field?: (string | number)[];
  }[];
  /** Every engraved or embossed region (rings, pockets and the QR code too), to hold them to the slab. */
  allMarks?: CrossSection[];
  texts: { mark: { relief: "engrave" | "emboss"; size: number }; value: string }[];
  qr: { shape: QrShape; x: number; y: number; mark: { module: number } } | null;
  unfilled: string[];
  /** Each part's extent (mm) along x, y and z, and whether it fits the small-parts cylinder (small-parts.ts). */
  solids: { partId: string; name: string; size: [number, number, number]; smallParts: CylinderFit }[];
};

/** Areas below this (mm²) are rounding, not overlap. */
const AREA_EPS = 0.01;

/**
 * Height over contact width above which a piece standing on an air gap may be knocked over by the
 * nozzle (from memory: about 3:1 for FDM parts without a brim).
 */
export const TIP_RATIO = 3;

/** Warn when an opening (shrink, then grow back) by half the printable stroke removes more of a mark than this. */
export const THIN_LOSS = 0.25;

/**
 * The narrowest stroke a mark prints with: one line of the nozzle for an engraved groove, two for an
 * embossed rib (a slicer draws a raised stroke as two perimeters; narrower, it leaves it out).
 */
export function printableStroke(nozzle: number, relief: "engrave" | "emboss"): number {
  return relief === "engrave" ? nozzle : 2 * nozzle;
}

/**
 * The share of a region that an opening by `stroke` removes (shrink by half of it, grow back): what
 * is narrower than the stroke and would not print. 0 for a region without area.
 */
export function strokeLoss(scope: Scope, cs: CrossSection, stroke: number): number {
  const a = cs.area();
  if (a <= 0) return 0;
  const opened = scope.track(scope.track(cs.offset(-stroke / 2, "Round", 2, 16)).offset(stroke / 2, "Round", 2, 16));
  return 1 - opened.area() / a;
}

const r1 = (n: number) => n.toFixed(1);
const r2 = (n: number) => n.toFixed(2);

function overlaps(a: Box, b: Box, pad = 0): boolean {
  return a.minX < b.maxX + pad && b.minX < a.maxX + pad && a.minY < b.maxY + pad && b.minY < a.maxY + pad;
}

export function runChecks(kernel: Kernel, scope: Scope, c: CheckInput): Finding[] {
  const { CrossSection } = kernel.wasm;
  const o = c.options;
  const out: Finding[] = [];
  const area = (cs: CrossSection) => cs.area();

  // Bed.
  if (c.slabSize.width > o.layout.bed.width + 1e-6 || c.slabSize.depth > o.layout.bed.depth + 1e-6) {
    out.push({
      severity: "error",
      code: "slab_outside_bed",
      field: ["layout", "bed"],
      message:
        `The slab is ${r1(c.slabSize.width)} × ${r1(c.slabSize.depth)} mm; the bed is ${o.layout.bed.width} × ` +
        `${o.layout.bed.depth} mm.`,
    });
  }

  // The slab is always drawn around every piece and mark (with the margin), hand-placed ones too,
  // so nothing can hang over its edge; what can happen is that it outgrows the bed.
  const bed = { minX: 0, minY: 0, maxX: o.layout.bed.width, maxY: o.layout.bed.depth };
  for (const p of c.pieces) {
    if (
      p.bounds.minX < bed.minX - 1e-6 ||
      p.bounds.minY < bed.minY - 1e-6 ||
      p.bounds.maxX > bed.maxX + 1e-6 ||
      p.bounds.maxY > bed.maxY + 1e-6
    ) {
      out.push({
        severity: "error",
        code: "piece_outside_bed",
        piece: p.number,
        field: ["layout", "placements"],
        message: `Piece ${p.number} (${p.name}) lies outside the ${o.layout.bed.width} × ${o.layout.bed.depth} mm bed.`,
      });
    }
  }
  const spacing = o.layout.spacing;
  const grownBy = (by: number) => {
    const cache = new Map<number, CrossSection>();
    return (p: CheckInput["pieces"][number]) => {
      let g = cache.get(p.number);
      if (!g) {
        g = scope.track(p.shadow.offset(Math.max(0, by / 2 - 1e-3), "Round", 2, 24));
        cache.set(p.number, g);
      }
      return g;
    };
  };
  const grow = grownBy(spacing);
  const line = grownBy(o.nozzle);
  for (let i = 0; i < c.pieces.length; i++) {
    for (let j = i + 1; j < c.pieces.length; j++) {
      const a = c.pieces[i]!,
        b = c.pieces[j]!;
      if (!overlaps(a.bounds, b.bounds, Math.max(spacing, o.nozzle))) continue;
      const both = area(scope.track(a.shadow.intersect(b.shadow)));
      if (both > AREA_EPS) {
        out.push({
          severity: "error",
          code: "pieces_overlap",
          pieces: [a.number, b.number],
          piece: a.number,
          field: ["layout", "placements"],
          message: `Pieces ${a.number} and ${b.number} overlap by ${r1(both)} mm².`,
        });
      } else if (area(scope.track(line(a).intersect(line(b)))) > AREA_EPS) {
        out.push({
          severity: "error",
          code: "pieces_fuse",
          pieces: [a.number, b.number],
          piece: a.number,
          field: ["layout", "placements"],
          message:
            `Pieces ${a.number} and ${b.number} are closer than one ${r2(o.nozzle)} mm line: they would print as one. Move ` +
            `them at least ${r2(o.nozzle)} mm apart.`,
        });
      } else if (spacing > 0 && area(scope.track(grow(a).intersect(grow(b)))) > AREA_EPS) {
        out.push({
          severity: "warning",
          code: "pieces_too_close",
          pieces: [a.number, b.number],
          piece: a.number,
          field: ["layout", "placements"],
          message: `Pieces ${a.number} and ${b.number} are closer than the ${spacing} mm spacing. Move them apart.`,
        });
      }
    }
  }

  // The slab is built around everything; this holds it to that: nothing may stand or be cut off it.
  {
    const content = [...c.pieces.map((p) => scope.track(p.shadow.offset(p.ringExt, "Round", 2, 24))), ...(c.allMarks ?? [])];
    if (content.length) {
      const off = scope.track(scope.track(CrossSection.union(content)).subtract(c.slab));
      const a = area(off);
      if (a > AREA_EPS) {
        const hanging = c.pieces.filter((p) => area(scope.track(p.shadow.subtract(c.slab))) > AREA_EPS).map((p) => p.number);
        out.push({
          severity: "error",
          code: "off_slab",
          field: ["slab", "margin"],
          ...(hanging.length ? { pieces: hanging, piece: hanging[0] } : {}),
          message:
            `${r1(a)} mm² of ` +
            `${hanging.length ? `piece${hanging.length > 1 ? "s" : ""} ${hanging.join(", ")} and their` : "the"} outlines and marks ` +
            `lie off the slab. Make the margin or the slab larger.`,
        });
      }
    }
  }

  // Standing steady on the gap.
  for (const p of c.pieces) {
    const d = 2 * Math.sqrt(p.contactArea / Math.PI);
    if (p.contactArea < 1) {
      out.push({
        severity: "warning",
        code: "contact_too_small",
        piece: p.number,
        message: `Piece ${p.number} (${p.name}) touches the slab with only ${r2(p.contactArea)} mm²; lay it flat or add a base.`,
      });
    } else if (p.height / d > TIP_RATIO) {
      out.push({
        severity: "warning",
        code: "tip_over_risk",
        piece: p.number,
        message:
          `Piece ${p.number} (${p.name}) is ${r1(p.height)} mm tall on a base about ${r1(d)} mm across (over ${TIP_RATIO}:1): ` +
          `it may be knocked over while printing.`,
      });
    }
  }

  // Marks against pieces and the slab.
  if (c.marks.length || c.qr) {
    const keepOut = scope.track(CrossSection.union(c.pieces.map((p) => scope.track(p.shadow.offset(p.ringExt, "Round", 2, 24)))));
    for (const mk of c.marks) {
      if (area(scope.track(mk.cs.intersect(keepOut))) > AREA_EPS) {
        out.push({
          severity: "error",
          code: "mark_collides",
          field: mk.field ? [...mk.field.slice(0, -1), "position"] : ["layout", "placements"],
          message:
            `The ${mk.kind === "number" ? mk.label : mk.kind === "logo" ? `logo ${mk.label}` : `text ${mk.label}`} runs under ` +
            `a piece or its outline; move it.`,
        });
      }
    }
    if (c.qr) {
      const s = c.qr.shape.sizeWithQuietZone;
      const zone = scope.track(
        new CrossSection([
          [
            [c.qr.x, c.qr.y],
            [c.qr.x + s, c.qr.y],
            [c.qr.x + s, c.qr.y + s],
            [c.qr.x, c.qr.y + s],
          ],
        ]),
      );
      const others = c.marks.length ? scope.track(CrossSection.union(c.marks.map((m) => m.cs))) : null;
      if (area(scope.track(zone.intersect(keepOut))) > AREA_EPS || (others && area(scope.track(zone.intersect(others))) > AREA_EPS)) {
        out.push({
          severity: "error",
          code: "qr_quiet_zone",
          field: ["marks", "qr", "position"],
          message:
            "Something lies in the QR code's quiet zone (4 modules all round, ISO/IEC 18004); scanners may not read it. Move the " +
            "code or the pieces.",
        });
      }
    }
  }

  // Printable mark sizes.
  const nozzle = o.nozzle;
  if (c.qr && c.qr.mark.module < 2.5 * nozzle - 1e-9) {
    out.push({
      severity: "warning",
      code: "qr_module_too_small",
      message:
        `QR modules of ${r2(c.qr.mark.module)} mm are under 2.5 × the ${nozzle} mm nozzle (${r2(2.5 * nozzle)} mm); the code ` +
        `may not scan. Use bigger modules or a shorter value.`,
    });
  }
  // A ring is exactly its width: under one line width it is not printed at all.
  if (o.marks.outlines === "ring" && o.marks.ringStyle.width < nozzle - 1e-9) {
    out.push({
      severity: "error",
      code: "ring_too_narrow",
      field: ["marks", "ringStyle", "width"],
      message:
        `Outline rings ${r2(o.marks.ringStyle.width)} mm wide are narrower than one line of the ${nozzle} mm nozzle: the ` +
        `slicer leaves them out. Make them at least ${r2(nozzle)} mm wide (${r2(nozzle - o.marks.ringStyle.width)} mm more), or use ` +
        `pockets.`,
    });
  }
  for (const mk of c.marks) {
    if (mk.kind === "qr") continue;
    const stroke = printableStroke(nozzle, mk.relief);
    const lost = strokeLoss(scope, mk.cs, stroke);
    if (lost > THIN_LOSS) {
      out.push({
        severity: "warning",
        code: "stroke_too_thin",
        ...(mk.field ? { field: mk.field } : {}),
        message:
          `Strokes of the ${mk.kind === "number" ? mk.label : mk.kind === "logo" ? `logo ${mk.label}` : `text ${mk.label}`} ` +
          `are narrower than ${r2(stroke)} mm (${mk.relief === "engrave" ? "1" : "2"} × the nozzle, for ` +
          `${mk.relief === "engrave" ? "engraved" : "embossed"} marks): ${Math.round(lost * 100)} % of it would not print. Make it ` +
          `larger or bolder.`,
      });
    }
  }

  // Slab against warping and layers.
  if (o.slab.shape === "rounded-rect" && o.slab.cornerRadius < 4 && MATERIALS[o.material].warpProne) {
    out.push({
      severity: "warning",
      code: "sharp_corners",
      message: `${o.material} warps: corners under 4 mm radius tend to lift. Round them to at least 4 mm or use a disc slab.`,
    });
  }
  if (o.slab.gap < 0.2 - 1e-9 || o.slab.gap > 0.3 + 1e-9) {
    out.push({
      severity: "warning",
      code: "gap_out_of_range",
      message:
        `A ${r2(o.slab.gap)} mm gap is outside the usual 0.20–0.30 mm: ` +
        `${o.slab.gap < 0.2 ? "pieces may fuse to the slab" : "pieces may come loose while printing"}.`,
    });
  }
  // The gap as a slicer makes it: whole layers between the slab's last and the pieces' first.
  const sliced = slicedGap(o);
  const at = `${r2(o.layerHeight)} mm layers${o.firstLayerHeight !== o.layerHeight ? ` (first layer ${r2(o.firstLayerHeight)} mm)` : ""}`;
  if (sliced.gap <= 1e-9) {
    out.push({
      severity: "error",
      code: "gap_sliced_away",
      field: ["slab", "gap"],
      message:
        `At ${at} the slicer rounds the ${r2(o.slab.gap)} mm gap to nothing: the pieces' first layer lands on the slab and ` +
        `they fuse to it. Use a gap of ${r2(o.layerHeight)} mm (one layer) or more.`,
    });
  } else if (o.slab.gap < o.layerHeight - 1e-9) {
    out.push({
      severity: "error",
      code: "gap_below_layer",
      field: ["slab", "gap"],
      message:
        `The ${r2(o.slab.gap)} mm gap is thinner than one ${r2(o.layerHeight)} mm layer: a slicer cannot print it as asked ` +
        `(it would make it ${r2(sliced.gap)} mm, or lose it). Use ${r2(o.layerHeight)} mm (one layer), or thinner layers.`,
    });
  } else if (Math.abs(sliced.gap - o.slab.gap) > 1e-6) {
    out.push({
      severity: "info",
      code: "gap_sliced",
      field: ["slab", "gap"],
      message:
        `At ${at} a slicer makes the ${r2(o.slab.gap)} mm gap ${r2(sliced.gap)} mm (${sliced.layers} ` +
        `layer${sliced.layers === 1 ? "" : "s"}). Set the gap to ${r2(sliced.gap)} mm to get what you see, or keep it in the ` +
        `slicer's own gap setting.`,
    });
  }
  if (Math.abs(sliced.slabTop - o.slab.thickness) > 1e-6) {
    out.push({
      severity: "info",
      code: "thickness_sliced",
      field: ["slab", "thickness"],
      message: `At ${at} a slicer makes the ${r2(o.slab.thickness)} mm slab ${r2(sliced.slabTop)} mm thick.`,
    });
  }

  // Small parts (informational: only matters for kits that may reach children). One finding for the plate.
  // 16 CFR 1501.4(b)(1): a part that fits the cylinder "in any orientation", uncompressed, is a small
  // part; its convex hull is tested against the fixture's real shape over all orientations.
  const small: { name: string; dims: number[]; numbers: number[]; maybe: number | null | undefined }[] = [];
  for (const s of c.solids) {
    const fit = s.smallParts;
    if (fit.verdict === "does_not_fit") continue;
    small.push({
      name: s.name,
      dims: [...s.size].sort((x, y) => x - y),
      numbers: c.pieces.filter((p) => p.partId === s.partId).map((p) => p.number),
      maybe: fit.verdict === "may_fit" ? fit.within : undefined,
    });
  }
  if (small.length) {
    const list = small
      .map(
        (s) =>
          `${s.name} (${s.dims.map(r1).join(" × ")} ` +
          `mm${s.maybe === undefined ? "" : s.maybe === null ? ", may fit: not decided" : `, may fit: within ${r2(s.maybe)} mm`})`,
      )
      .join(", ");
    const pieces = small.flatMap((s) => s.numbers).sort((a, b) => a - b);
    const all = small.every((s) => s.maybe === undefined);
    out.push({
      severity: "info",
      code: "small_part",
      pieces,
      piece: pieces[0],
      message:
        `${list} ${all ? (small.length === 1 ? "fits" : "fit") : "may fit"} the small-parts cylinder of US 16 CFR 1501 (31.75 ` +
        `mm across, 25.4–57.15 mm deep, in some orientation): not for children under 3, and toys for ages 3 to 6 with small parts ` +
        `need the choking-hazard warning label of 16 CFR 1500.19. The rules differ where you sell: follow the local regulations.`,
    });
  }

  for (const name of new Set(c.unfilled)) {
    out.push({ severity: "warning", code: "unfilled_placeholder", message: `${name} has no value, so it would be engraved as written.` });
  }
  return out;
}
