import { z } from "zod";
import { slabOptionsSchema, type SlabOptionsInput } from "@/lib/geometry/options";

export const ORIENTATIONS = ["as-imported", "lay-flat", "turned"] as const;
export const ORIENTATION_LABEL: Record<(typeof ORIENTATIONS)[number], string> = {
  "as-imported": "as imported",
  "lay-flat": "lay flat",
  turned: "upside down",
};

export const kitLineSchema = z.object({
  partId: z.string().min(1, "Choose a part."),
  quantity: z.coerce.number().int("Whole pieces only.").min(1, "At least 1.").max(500, "At most 500."),
  rotation: z.coerce.number().min(-360, "Between −360° and 360°.").max(360, "Between −360° and 360°."),
  orientation: z.enum(ORIENTATIONS),
});

export const kitSchema = z.object({
  id: z.string().optional(),
  name: z.string().trim().min(1, "Name the kit.").max(120),
  description: z.string().trim().max(500).optional(),
  // A kit is what one order holds; hundreds of lines is already a catalogue.
  lines: z.array(kitLineSchema).min(1, "Add at least one part.").max(300, "A kit holds at most 300 lines; split it into several kits."),
});

export type KitInput = z.input<typeof kitSchema>;

/**
 * A kit's last slab settings, kept with the kit so the slab editor opens where the designer left it:
 * the editor's options (with hand placements), the values typed for the placeholders and the
 * template applied. The options are checked by the engine's own schema, on the way in and out.
 */
export const kitSlabSettingsSchema = z.object({
  options: z.custom<SlabOptionsInput>(
    (v) => typeof v === "object" && v !== null && slabOptionsSchema.safeParse(v).success,
    "The slab options do not match the slab builder's options.",
  ),
  samples: z.record(z.string(), z.string().max(500)).default({}),
  template: z
    .object({ id: z.string().min(1), version: z.number().int().min(1) })
    .nullable()
    .default(null),
});
export type KitSlabSettings = z.output<typeof kitSlabSettingsSchema>;

/** Stored settings read back: null (the editor's defaults) when there are none or they no longer pass, never an error. */
export function readSlabSettings(stored: unknown): KitSlabSettings | null {
  const r = kitSlabSettingsSchema.safeParse(stored);
  return r.success ? r.data : null;
}
