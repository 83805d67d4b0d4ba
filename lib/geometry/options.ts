import { z } from "zod";
import { ENGRAVING_FONTS } from "./fonts";

/**
 * The slab builder's options: the one canonical table. The slab editor's form, the plate API and
 * templates all use these names, units (millimetres) and defaults. Defaults follow common practice in
 * print-farm production (see the trade facts): a 1.0 mm slab, a 0.25 mm air gap, rounded corners.
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

export const textMarkSchema = z
  .object({
    value: z.string().trim().min(1, "Enter the text to engrave.").max(120),
    /** Cap height in mm. */
    size: mm(1, 40).default(5),
    font: z.enum(fontIds).default("sans-bold"),
    relief: reliefSchema.default("engrave"),
    /** Engraving depth or embossing height in mm. */
    depth: mm(0.1, 2).default(0.4),
    position: markPositionSchema.default("auto"),
    /** The longest the line may be once its {placeholders} are filled (a template's room for a name). */
    maxWidth: mm(5, 2000).optional(),
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
    depth: mm(0.1, 2).default(0.4),
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
    paths: z.array(z.object({ d: z.string().min(1).max(1_500_000), fillRule: z.enum(["nonzero", "evenodd"]).default("nonzero") }).strict()).min(1).max(500),
    box: z.object({ minX: z.number().finite(), minY: z.number().finite(), maxX: z.number().finite(), maxY: z.number().finite() }).strict().refine((b) => b.maxX > b.minX && b.maxY > b.minY, "The logo's box has no area."),
    width: mm(3, 200).default(20),
    relief: reliefSchema.default("engrave"),
    depth: mm(0.1, 2).default(0.4),
    position: markPositionSchema.default("auto"),
  })
  .strict();
export type LogoMark = z.infer<typeof logoMarkSchema>;

export const placementSchema = z
  .object({ piece: z.number().int().min(1), x: z.number().finite(), y: z.number().finite(), rotation: z.number().finite().default(0) })
  .strict();
export type Placement = z.infer<typeof placementSchema>;

export const slabOptionsSchema = z
  .object({
    slab: z
      .object({
        shape: z.enum(["disc", "rounded-rect", "contour"]).default("rounded-rect"),
        thickness: mm(0.6, 3).default(1.0),
        gap: mm(0.1, 0.5).default(0.25),
        cornerRadius: mm(0, 100).default(5),
        margin: mm(0, 50).default(4),
      })
      .strict()
      .prefault({}),
    layout: z
      .object({
        spacing: mm(0, 50).default(3),
        bed: z.object({ width: mm(20, 2000), depth: mm(20, 2000) }).strict().default({ width: 220, depth: 220 }),
        copies: z.number().int().min(1).max(100).default(1),
        placements: z.array(placementSchema).max(2000).optional(),
      })
      .strict()
      .prefault({}),
    marks: z
      .object({
        text: z.array(textMarkSchema).max(6).default([]),
        qr: qrMarkSchema.optional(),
        logo: logoMarkSchema.optional(),
        numbers: z.boolean().default(true),
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

/** Ring outlines: 0.6 mm wide, starting 0.8 mm outside the footprint (common practice). */
export const RING = { clearance: 0.8, width: 0.6 } as const;
/** Piece numbers: 4 mm cap height in the mono face. */
export const NUMBER_SIZE = 4;
