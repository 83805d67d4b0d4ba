/**
 * The findings a build raises between its steps, each before the step it guards (the plate's own
 * checks, once everything is laid out, are in checks.ts): the marks' shapes and the room a template
 * gives them, the layout on the bed, the piece numbers asked for, the slab's corners, and every
 * mark's depth.
 */
import type { Finding } from "./checks";
import type { Logo, MarkPlaces, MarkShapes } from "./mark-bands";
import { LOGO_LIMITS } from "./marks/logo";
import { qrShape } from "./marks/qr";
import { deepestEngraving, depthOrDefault, floorUnderMarks, type Depth, type SlabOptions } from "./options";
import type { CornerFit } from "./slab";

/** A logo that flattens to more points than are engraved: the build stops before laying anything out. */
export function logoTooComplex(logo: Logo | null): Finding | undefined {
  if (!logo) return undefined;
  const points = logo.parts.reduce((n, p) => n + p.contours.reduce((m, c) => m + c.length, 0), 0);
  if (points <= LOGO_LIMITS.points) return undefined;
  return {
    severity: "error",
    code: "logo_too_complex",
    field: ["marks", "logo", "paths"],
    message:
      `The logo flattens to ${points.toLocaleString("en-US")} points at ${logo.w} mm; at most ` +
      `${LOGO_LIMITS.points.toLocaleString("en-US")} are engraved. Simplify its curves.`,
  };
}

/**
 * Room a template gives the QR code's filled value (its maxSize): too large is an error that says by
 * how much. (A text line's room, maxWidth included, is fitted in text-fit.ts.)
 */
export function roomForValues(shapes: MarkShapes): Finding[] {
  const out: Finding[] = [];
  const qr = shapes.qr;
  if (qr && qr.mark.maxSize !== undefined && qr.shape.sizeWithQuietZone > qr.mark.maxSize + 1e-9) {
    // The longest start of the value that still fits, found by halving.
    let lo = 0,
      hi = qr.value.length;
    while (lo < hi) {
      const mid = Math.ceil((lo + hi) / 2);
      if (qrShape(qr.value.slice(0, mid) || " ", qr.mark.module, qr.mark.level).sizeWithQuietZone <= qr.mark.maxSize) lo = mid;
      else hi = mid - 1;
    }
    out.push({
      severity: "error",
      code: "qr_too_large",
      field: ["marks", "qr", "value"],
      message:
        `The QR code for "${qr.value.length > 60 ? `${qr.value.slice(0, 57)}…` : qr.value}" needs ${qr.shape.modules} ` +
        `modules, ${qr.shape.sizeWithQuietZone.toFixed(1)} mm with its quiet zone; the template allows ${qr.mark.maxSize} mm: ` +
        `${(qr.shape.sizeWithQuietZone - qr.mark.maxSize).toFixed(1)} mm too large. Shorten the value by ${qr.value.length - lo} ` +
        `characters (or use smaller modules or a lower error correction).`,
    });
  }
  return out;
}

/**
 * The pieces and bands found no place on the bed: what the widest row needs. Text lines are fitted
 * to the bed before the layout (text-fit.ts), so a too-long line is never the cause here.
 */
export function doesNotFit(o: SlabOptions, room: { needW: number; maxW: number }): Finding[] {
  const { needW, maxW } = room;
  const m = o.slab.margin;
  const widest = needW > maxW ? ` (the widest row needs ${needW.toFixed(1)} mm, ${(needW - maxW).toFixed(1)} mm more than there is)` : "";
  return [
    {
      severity: "error",
      code: "does_not_fit",
      field: ["layout", "bed"],
      message:
        `The pieces and marks do not fit a ${o.layout.bed.width} × ${o.layout.bed.depth} mm bed with ${m} mm ` +
        `margins${widest}. Use a bigger bed, fewer copies, or split the kit over two plates.`,
    },
  ];
}

/** The slots a plate of a split kit holds (layout.pieces) must be the kit's, each once. */
export function unknownSlots(o: SlabOptions, kitSize: number): Finding | undefined {
  const asked = o.layout.pieces;
  if (!asked) return undefined;
  const seen = new Set<number>();
  const bad = asked.find((s) => s > kitSize || seen.size === seen.add(s).size);
  if (bad === undefined) return undefined;
  return {
    code: "plate_pieces_unknown",
    severity: "error",
    field: ["layout", "pieces"],
    message:
      bad > kitSize
        ? `layout.pieces names piece ${bad}, but the kit has ${kitSize} pieces; give pieces 1 to ${kitSize}, in kit order.`
        : `layout.pieces names piece ${bad} twice; give each piece of this plate once.`,
  };
}

/** Numbers asked for in layout.pieceNumbers must be one per piece, each its own. */
export function pieceNumbersMismatch(given: number[] | undefined, pieces: number): Finding | undefined {
  if (!given) return undefined;
  const dup = given.find((n, i) => given.indexOf(n) !== i);
  if (given.length === pieces && dup === undefined) return undefined;
  return {
    severity: "error",
    code: "piece_numbers_mismatch",
    field: ["layout", "pieceNumbers"],
    message:
      dup !== undefined
        ? `Piece number ${dup} is given twice in layout.pieceNumbers; each piece needs its own.`
        : `layout.pieceNumbers lists ${given.length} numbers for ${pieces} pieces; give exactly one per piece, in kit order.`,
  };
}

/** Round corners that made the slab grow, or that were limited to keep it on the bed (slab.ts). */
export function cornerFinding(o: SlabOptions, c: CornerFit): Finding {
  const mm = ([w, d]: [number, number]) => `${w.toFixed(1)} × ${d.toFixed(1)} mm`;
  if (c.kind === "grown") {
    return {
      severity: "info",
      code: "corners_grow_slab",
      field: ["slab", "cornerRadius"],
      message:
        `The ${c.asked} mm corners would cut into the pieces and marks, so the slab is ${(2 * c.grownBy).toFixed(1)} mm wider ` +
        `and deeper than they need (${mm(c.size)}). Choose a radius of ${c.largestFitting.toFixed(1)} mm or less (or a disc) to keep ` +
        `it at its smallest.`,
    };
  }
  return {
    severity: "warning",
    code: "corner_radius_limited",
    field: ["slab", "cornerRadius"],
    message:
      `Corners of ${c.asked} mm would cut into the pieces and marks, and a slab grown to hold them (${mm(c.grownSize)}) would ` +
      `not fit the ${o.layout.bed.width} × ${o.layout.bed.depth} mm bed; the corners are rounded to ${c.radius.toFixed(1)} mm ` +
      `instead. Choose ${(Math.floor(c.radius * 10 + 0.01) / 10).toFixed(1)} mm or less, or a disc.`,
  };
}

/**
 * How deep each mark is cut (or how high it stands), in mm. Text lines (by their place in
 * `MarkPlaces.texts`) and the logo have none when they have no outline to cut.
 */
export type MarkDepths = { ring: number; number: number; texts: (number | undefined)[]; qr?: number; logo?: number };

/**
 * Every mark's depth. Every engraving leaves its floor: too deep is refused at its field, "max" is as
 * deep as allowed. Rings, pockets and numbers left to their default take `depthOrDefault`.
 */
export function markDepths(o: SlabOptions, places: MarkPlaces, logo: Logo | null): { depths: MarkDepths; findings: Finding[] } {
  const findings: Finding[] = [];
  const deepest = deepestEngraving(o);
  const floor = floorUnderMarks(o);
  const depthOf = (relief: "engrave" | "emboss", depth: Depth, field: (string | number)[], what: string): number => {
    // A refused depth still gets a number (the build stops at the finding before it is cut).
    if (relief === "emboss") {
      if (depth === "max") {
        findings.push({
          severity: "error",
          code: "emboss_needs_height",
          field,
          message: `The ${what} is embossed: give it a height in mm ("as deep as allowed" is for engraving).`,
        });
        return 0.4;
      }
      return depth;
    }
    if (deepest < 0.1 - 1e-9) {
      findings.push({
        severity: "error",
        code: "slab_too_thin_to_engrave",
        field,
        message:
          `The ${what} cannot be engraved in a ${o.slab.thickness} mm slab: every engraving must leave ${floor.toFixed(2)} mm ` +
          `under it (two ${o.layerHeight} mm layers, and never under 0.4 mm). Make the slab at least ${(floor + 0.2).toFixed(1)} mm ` +
          `thick, or emboss the mark.`,
      });
      return 0.1;
    }
    if (depth === "max") return deepest;
    if (depth > deepest + 1e-9) {
      findings.push({
        severity: "error",
        code: "mark_too_deep",
        field,
        message:
          `The ${what} is engraved ${depth} mm deep in a ${o.slab.thickness} mm slab, leaving ` +
          `${Math.max(0, o.slab.thickness - depth).toFixed(2)} mm under it; every engraving must leave ${floor.toFixed(2)} mm (two ` +
          `${o.layerHeight} mm layers, and never under 0.4 mm). Make it at most ${deepest.toFixed(2)} mm deep ` +
          `(${(depth - deepest).toFixed(2)} mm less), thicken the slab to ${(depth + floor).toFixed(1)} mm, or choose "as deep as ` +
          `allowed".`,
      });
    }
    return depth;
  };
  const { marks } = o;
  const ring =
    marks.outlines === "none"
      ? 0
      : depthOf(
          "engrave",
          depthOrDefault(o, marks.ringStyle.depth),
          ["marks", "ringStyle", "depth"],
          marks.outlines === "pocket" ? "pocket under each piece" : "outline ring under each piece",
        );
  const number = marks.numbers
    ? depthOf("engrave", depthOrDefault(o, marks.numberStyle.depth), ["marks", "numberStyle", "depth"], "piece numbers")
    : 0;
  const texts = places.texts.map((b) => {
    if (b.shape.contours.length === 0) return undefined;
    return depthOf(b.mark.relief, b.mark.depth, ["marks", "text", b.line, "depth"], `text line ${b.line + 1} ("${b.value}")`);
  });
  const qr = places.qr ? depthOf(places.qr.mark.relief, places.qr.mark.depth, ["marks", "qr", "depth"], "QR code") : undefined;
  const lg =
    logo && places.logo && logo.parts.some((p) => p.contours.length)
      ? depthOf(logo.mark.relief, logo.mark.depth, ["marks", "logo", "depth"], `logo ${logo.mark.name}`)
      : undefined;
  return { depths: { ring, number, texts, ...(qr !== undefined ? { qr } : {}), ...(lg !== undefined ? { logo: lg } : {}) }, findings };
}
