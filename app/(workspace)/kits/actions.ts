"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { createPlate, remakePlate } from "@/lib/plates/create";
import { resolvePlateRequest } from "@/lib/plates/request";
import { archiveKit, duplicateKit, saveKit, saveSlabSettings } from "@/lib/kits/service";
import { guardedAction } from "@/lib/auth/guards";
import { idSchema } from "@/lib/validation/accounts";
import { kitSchema, kitSlabSettingsSchema } from "@/lib/validation/kits";

export const saveKitAction = guardedAction(kitSchema, "kits:write", "editing kits", async (input, caller) => {
  const id = await saveKit(caller, input);
  revalidatePath("/kits");
  return { ok: true, data: { id }, message: "Kit saved." };
});

export const duplicateKitAction = guardedAction(idSchema, "kits:write", "duplicating kits", async (input, caller) => {
  const id = await duplicateKit(caller, input.id);
  revalidatePath("/kits");
  return { ok: true, data: { id }, message: "Kit duplicated." };
});

export const archiveKitAction = guardedAction(idSchema, "kits:write", "archiving kits", async (input, caller) => {
  await archiveKit(caller, input.id);
  revalidatePath("/kits");
  return { ok: true, data: undefined, message: "Kit archived." };
});

/**
 * The slab editor keeps the kit's slab as the designer works (debounced, one call per pause). No
 * revalidation: the editor already shows what it saved, and a refresh would reset the form.
 */
export const saveSlabSettingsAction = guardedAction(
  z.object({ kitId: z.string().min(1), settings: kitSlabSettingsSchema }),
  "kits:write",
  "changing kits",
  async (input, caller) => {
    await saveSlabSettings(caller, input.kitId, input.settings);
    return { ok: true, data: undefined };
  },
);

const makePlateSchema = z.object({
  kitId: z.string().min(1),
  options: z.record(z.string(), z.unknown()),
  variables: z.record(z.string(), z.string()),
  templateId: z.string().optional(),
  templateVersion: z.number().int().min(1).optional(),
});

/** "Make the plate" in the slab editor: the same plate path, queue and worker as the API. */
export const makePlateAction = guardedAction(makePlateSchema, "plates:make", "making plates", async (input, caller) => {
  const template = input.templateId
    ? { id: input.templateId, ...(input.templateVersion ? { version: input.templateVersion } : {}) }
    : undefined;
  const request = await resolvePlateRequest(caller, {
    kitId: input.kitId,
    options: input.options,
    variables: input.variables,
    format: "3mf",
    ...(template ? { template } : {}),
  });
  const { plate } = await createPlate(caller, request.spec, { source: "editor" });
  revalidatePath("/plates");
  return { ok: true, data: { plateId: plate.id } };
});

/** "Make again": the same parts, options, values and template version; the same bytes. */
export const remakePlateAction = guardedAction(
  z.object({ plateId: z.string().min(1) }),
  "plates:make",
  "making plates",
  async (input, caller) => {
    const plate = await remakePlate(caller, input.plateId);
    revalidatePath("/plates");
    return { ok: true, data: { plateId: plate.id }, message: "Making the plate again: it appears in the list when it is built." };
  },
);
