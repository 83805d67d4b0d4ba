import { piecesAndBands, type BuildInput } from "./build-plate";
import { doesNotFit } from "./build-checks";
import type { Finding } from "./checks";
import { withScope, type Kernel } from "./kernel";
import { parseOptions } from "./options";
import { fillBed } from "./piece-nest";
import { convexHullOf, convexArea, type Pt } from "./nest";
import { grownHull } from "./hug";

/**
 * A kit split over plates: each plate's pieces (slots in kit order) and the number its first piece
 * takes, so numbers run on from plate to plate ("Plate 2 of 3, pieces 19–31"). `areaBound` is the
 * fewest plates the pieces' packing area allows (their footprints, grown by ring and half the
 * spacing, over the bed's room): no split can use fewer.
 */
export type PlatePlan = { plates: { slots: number[]; firstNumber: number }[]; areaBound: number };

/**
 * The fewest plates the kit's pieces fill, found as a bed-filling nest repeated on what is left
 * (first fit by decreasing size, on true shapes): every plate its own slab with the marks' bands,
 * each built later with `layout.pieces` and `layout.firstNumber`. Findings instead when a piece
 * fits no bed at all, or the marks cannot be laid out.
 */
export function planPlates(kernel: Kernel, input: BuildInput): PlatePlan | { findings: Finding[] } {
  const options = parseOptions(input.options ?? {});
  const o = { ...options, layout: { ...options.layout, packing: "shapes" as const, pieces: undefined, placements: undefined } };
  const vars = { date: new Date().toISOString().slice(0, 10), ...input.variables };
  return withScope(kernel, (scope) => {
    const findings: Finding[] = [];
    const ctx = { kernel, scope, options: o, fonts: input.fonts, vars };
    const staged = piecesAndBands(ctx, input, findings);
    if (!staged) return { findings };
    const { pieces, room, bands } = staged;
    const grow = room.ext + room.spacing / 2;
    const area = pieces.reduce((s, p) => s + convexArea(grownHull(convexHullOf(p.fp.hull as Pt[]), grow)), 0);
    const m = o.slab.margin;
    const bedRoom = (o.layout.bed.width - 2 * m) * (o.layout.bed.depth - 2 * m - bands.h);
    const areaBound = bedRoom > 0 ? Math.ceil(area / bedRoom) : Infinity;
    const plates: PlatePlan["plates"] = [];
    let left = pieces;
    let next = 1;
    while (left.length) {
      const slots = fillBed(ctx, left, room, bands);
      if (!slots.length) {
        findings.push(...doesNotFit(o, { maxW: o.layout.bed.width - 2 * m, needW: bands.w }));
        return { findings };
      }
      const on = new Set(slots);
      plates.push({ slots: [...slots].sort((a, b) => a - b), firstNumber: next });
      next += slots.length;
      left = left.filter((p) => !on.has(p.slot));
    }
    return { plates, areaBound };
  });
}
