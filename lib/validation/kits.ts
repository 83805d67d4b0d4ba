import { z } from "zod";

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
