import { z } from "zod";
import { ENGRAVING_FONTS } from "./fonts";
import { SLAB_SHAPE_IDS } from "./slab-shapes";

/**
 * The slab builder's options: the one canonical table. The slab editor's form, the plate API and
 * templates all use these names, units (millimetres) and defaults. Defaults follow common practice in
 * print-farm production (see the trade facts): a 1.0 mm slab, a 0.2 mm air gap (one 0.2 mm layer), rounded corners.
 */

export const MATERIALS = {
  PLA: { density: 1.24, warpProne: false, styrene: false },
  PETG: { density: 1.27, warpProne: true, styrene: false },
  ABS: { density: 1.04, warpProne: true, styrene: true },
  ASA: { density: 1.07, warpProne: true, styrene: true },
  TPU: { density: 1.2, warpProne: false, styrene: false },
  PA12: { density: 1.02, warpProne: true, styrene: false },
} as const;
export type Material = keyof typeof MATERIALS;

const fontIds = Object.keys(ENGRAVING_FONTS) as [keyof typeof ENGRAVING_FONTS, ...(keyof typeof ENGRAVING_FONTS)[]];

const mm = (min: number, max: number) => z.number().finite().min(min).max(max);

export const markPositionSchema = z.union([
  z.enum(["auto", "top", "bottom"]),
  z.object({ x: z.number().finite(), y: z.number().finite() }).strict(),
]);
export type MarkPosition = z.infer<typeof markPositionSchema>;

export const reliefSchema = z.enum(["engrave", "emboss"]);

/**
 * An engraving's depth (or an embossed mark's height) in mm, or "max": as deep as the slab allows,
 * leaving the floor every engraving must keep under it (see `floorUnderMarks`).
 */
export const depthSchema = z.union([mm(0.1, 2), z.literal("max")]);
export type Depth = z.infer<typeof depthSchema>;

/**
 * What a text line does when it is longer than the room it has (its maxWidth, or what the bed leaves
 * it beside the band's logo and QR code): "shrink" lowers its cap height, never below the smallest
 * whose strokes still print at the nozzle, and says so; "refuse" stops the build with the line's finding.
 */
export const textFitSchema = z
  .enum(["shrink", "refuse"])
  .describe(
    'When the filled line is longer than its room (maxWidth, or what the bed leaves it): "shrink" lowers its cap height, ' +
      'never below the smallest whose strokes print at the nozzle (a text_shrunk warning); "refuse" fails with text_too_long.',
  );
export type TextFit = z.infer<typeof textFitSchema>;

export const textMarkSchema = z
  .object({
    value: z.string().trim().min(1, "Enter the text to engrave.").max(120),
    /** Cap height in mm. */
    size: mm(1, 40).default(5),
    font: z.enum(fontIds).default("sans-bold"),
    relief: reliefSchema.default("engrave"),
    /** Engraving depth or embossing height in mm ("max": as deep as the slab allows). */
    depth: depthSchema.default(0.4),
    position: markPositionSchema.default("auto"),
    /** The longest the line may be once its {placeholders} are filled (a template's room for a name). */
    maxWidth: mm(5, 2000).optional(),
    fit: textFitSchema.default("shrink"),
  })
  .strict();
export type TextMark = z.infer<typeof textMarkSchema>;

export const qrMarkSchema = z
  .object({
    value: z.string().min(1, "Enter what the QR code should say.").max(1000),
    /** Side of one module in mm. */
    module: mm(0.3, 5).default(1.2),
    level: z.enum(["L", "M", "Q", "H"]).default("M"),
    relief: reliefSchema.default("engrave"),
    depth: depthSchema.default(0.4),
    position: markPositionSchema.default("auto"),
    /** The largest the code may be, quiet zone included, once its {placeholders} are filled. */
    maxSize: mm(5, 500).optional(),
  })
  .strict();
export type QrMark = z.infer<typeof qrMarkSchema>;

/**
 * A logo: outlines from an SVG drawing (see marks/logo.ts), kept as path data in the drawing's units
 * (y up) with their bounding box, placed `width` mm wide; the height follows the drawing's proportions.
 */
export const logoMarkSchema = z
  .object({
    name: z.string().max(120).default("logo"),
    paths: z
      .array(z.object({ d: z.string().min(1).max(1_500_000), fillRule: z.enum(["nonzero", "evenodd"]).default("nonzero") }).strict())
      .min(1)
      .max(500),
    box: z
      .object({ minX: z.number().finite(), minY: z.number().finite(), maxX: z.number().finite(), maxY: z.number().finite() })
      .strict()
      .refine((b) => b.maxX > b.minX && b.maxY > b.minY, "The logo's box has no area."),
    width: mm(3, 200).default(20),
    relief: reliefSchema.default("engrave"),
    depth: depthSchema.default(0.4),
    position: markPositionSchema.default("auto"),
  })
  .strict();
export type LogoMark = z.infer<typeof logoMarkSchema>;

export const placementSchema = z
  .object({ piece: z.number().int().min(1), x: z.number().finite(), y: z.number().finite(), rotation: z.number().finite().default(0) })
  .strict();

/**
 * The numbers engraved beside the pieces: cap height, face and depth. 4 mm bold mono engraved 0.4 mm
 * (two 0.2 mm layers) reads at arm's length and prints with a 0.4 mm nozzle (common practice).
 */
export const numberStyleSchema = z
  .object({
    size: mm(2, 20).default(4),
    font: z.enum(fontIds).default("mono-bold"),
    /** Left out: 0.4 mm, or as deep as a thinner slab allows. */
    depth: depthSchema.optional(),
  })
  .strict()
  .prefault({});

/**
 * The outline under each piece: a ring `width` wide starting `clearance` outside the piece's shadow,
 * or (outlines "pocket") a pocket that far out, `depth` deep. 0.8 mm (two 0.4 mm lines) wide, 0.8 mm
 * clear, 0.4 mm deep: common practice.
 */
export const ringStyleSchema = z
  .object({
    width: mm(0.2, 5).default(0.8),
    clearance: mm(0, 10).default(0.8),
    /** Left out: 0.4 mm, or as deep as a thinner slab allows. */
    depth: depthSchema.optional(),
  })
  .strict()
  .prefault({});
export type Placement = z.infer<typeof placementSchema>;

export const slabOptionsSchema = z
  .object({
    slab: z
      .object({
        shape: z.enum(SLAB_SHAPE_IDS).default(SLAB_SHAPE_IDS[0]),
        thickness: mm(0.6, 3).default(1.0),
        /** Air gap between the slab's top and the pieces: one 0.2 mm layer by default (see `slicedGap`). */
        gap: mm(0.1, 0.5).default(0.2),
        cornerRadius: mm(0, 100).default(5),
        margin: mm(0, 50).default(4),
      })
      .strict()
      .prefault({}),
    layout: z
      .object({
        spacing: mm(0, 50).default(3),
        bed: z
          .object({ width: mm(20, 2000), depth: mm(20, 2000) })
          .strict()
          .default({ width: 220, depth: 220 }),
        copies: z.number().int().min(1).max(100).default(1),
        /**
         * How pieces are packed: `shapes` nests them by their outlines, turned in 15° steps
         * (piece-nest.ts); `boxes` packs their bounding rectangles in rows, turned only a quarter.
         */
        packing: z.enum(["shapes", "boxes"]).default("shapes"),
        placements: z.array(placementSchema).max(2000).optional(),
        /**
         * The kit's pieces this plate holds, by their place in kit order (from 1): one plate of a kit
         * split over several (plans.ts `planPlates`). All of them when not given.
         */
        pieces: z.array(z.number().int().min(1).max(100_000)).min(1).max(2000).optional(),
        /** The number of the plate's first piece: a kit split over plates numbers on from plate to plate. */
        firstNumber: z.number().int().min(1).max(100_000).default(1),
        /**
         * Numbers to give the pieces, in kit order, instead of numbering them in reading order: a
         * reprint keeps each piece's number from the plate it replaces.
         */
        pieceNumbers: z.array(z.number().int().min(1).max(100_000)).max(2000).optional(),
      })
      .strict()
      .prefault({}),
    marks: z
      .object({
        text: z.array(textMarkSchema).max(6).default([]),
        qr: qrMarkSchema.optional(),
        logo: logoMarkSchema.optional(),
        numbers: z.boolean().default(true),
        numberStyle: numberStyleSchema,
        ringStyle: ringStyleSchema,
        outlines: z
          .union([z.enum(["ring", "pocket", "none"]), z.boolean()])
          .default("ring")
          .transform((v) => (v === true ? "ring" : v === false ? "none" : v)),
      })
      .strict()
      .prefault({}),
    material: z.enum(Object.keys(MATERIALS) as [Material, ...Material[]]).default("PLA"),
    nozzle: mm(0.1, 2).default(0.4),
    layerHeight: mm(0.04, 1).default(0.2),
    /** The first layer's height (slicers often print it thicker for grip); the slab's layers start on it. */
    firstLayerHeight: mm(0.04, 1).default(0.2),
    pricePerKg: z.number().finite().min(0).max(10_000).default(25),
  })
  .strict();

/** Options as a client sends them (everything optional). */
export type SlabOptionsInput = z.input<typeof slabOptionsSchema>;
/** Options with every default filled in. */
export type SlabOptions = z.output<typeof slabOptionsSchema>;

export function parseOptions(input: unknown): SlabOptions {
  return slabOptionsSchema.parse(input ?? {});
}

export const DEFAULT_OPTIONS: SlabOptions = parseOptions({});

/**
 * What every engraving must leave under it: two layers, and never under 0.4 mm, or the slab's floor
 * there tears or prints as loose strands (common practice: 0.4 mm engraving on a 1 mm slab leaves 0.6).
 */
export function floorUnderMarks(o: Pick<SlabOptions, "layerHeight">): number {
  return Math.max(2 * o.layerHeight, 0.4);
}

/** How deep an engraving may go on this slab (thickness less the floor), 0 when none is possible. */
export function deepestEngraving(o: Pick<SlabOptions, "layerHeight" | "slab">): number {
  return Math.max(0, o.slab.thickness - floorUnderMarks(o));
}

/** What an engraving left to its default is cut: two layers' worth (0.4 mm, common practice), or as deep as a thinner slab allows. */
export const DEFAULT_CUT_DEPTH = 0.4;

/** The depth of a ring, pocket or number: as asked or, where left out, the default (DEFAULT_CUT_DEPTH). */
export function depthOrDefault(o: Pick<SlabOptions, "layerHeight" | "slab">, depth: Depth | undefined): Depth {
  const deepest = deepestEngraving(o);
  return depth ?? (deepest >= 0.1 ? Math.min(DEFAULT_CUT_DEPTH, Math.round(deepest * 1e6) / 1e6) : DEFAULT_CUT_DEPTH);
}

/**
 * What a slicer makes of the slab and the gap. Layers start at z = 0 with the first layer, then
 * `layerHeight` each; a layer is cut at its middle height (as slicers do), so a solid fills every
 * layer whose middle lies inside it. The slab's top is the top of its last layer, the pieces' base the
 * bottom of their first: the gap between them is whole layers, and zero when they fuse.
 */
export function slicedGap(o: Pick<SlabOptions, "layerHeight" | "firstLayerHeight" | "slab">): {
  slabTop: number;
  pieceBase: number;
  gap: number;
  layers: number;
} {
  const f = o.firstLayerHeight,
    h = o.layerHeight;
  const top = (k: number) => (k <= 0 ? 0 : f + (k - 1) * h); // top of layer k (1-based)
  const mid = (k: number) => (k === 1 ? f / 2 : f + (k - 1.5) * h);
  const eps = 1e-9;
  // A cutting plane that meets a solid's flat top or bottom exactly counts as inside it.
  // Layers whose middle is in the slab: 1…a.
  let a = 0;
  while (mid(a + 1) <= o.slab.thickness + eps) a++;
  // The pieces start in the first layer whose middle is at or above their base.
  const base = o.slab.thickness + o.slab.gap;
  let b = a + 1;
  while (mid(b) < base - eps) b++;
  const round = (x: number) => Math.round(x * 1e6) / 1e6;
  const slabTop = round(top(a)),
    pieceBase = round(top(b - 1));
  const gap = round(Math.max(0, pieceBase - slabTop));
  return { slabTop, pieceBase, gap, layers: b - 1 - a };
}
