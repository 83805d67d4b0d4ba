"use server";

import { eq } from "drizzle-orm";
import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db";
import { plates } from "@/db/schema";
import { createPlate, readPlateRequest, remakePlate } from "@/lib/api/plates";
import { textForm } from "@/lib/api/multipart";
import { archiveKit, duplicateKit, saveKit } from "@/db/queries/kits";
import { guardedAction } from "@/lib/auth/guards";
import { idSchema } from "@/lib/validation/accounts";
import { kitSchema } from "@/lib/validation/kits";
import { AppError } from "@/lib/errors";

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

const makePlateSchema = z.object({ kitId: z.string().min(1), options: z.record(z.string(), z.unknown()), variables: z.record(z.string(), z.string()), templateId: z.string().optional(), templateVersion: z.number().int().min(1).optional() });

/** "Make the plate" in the slab editor: the same queue and worker as the API. */
export const makePlateAction = guardedAction(makePlateSchema, "plates:make", "making plates", async (input, caller) => {
  const form = textForm({ kit: input.kitId, options: JSON.stringify(input.options), variables: JSON.stringify(input.variables), template: input.templateId, templateVersion: input.templateVersion ? String(input.templateVersion) : undefined });
  try {
    const request = await readPlateRequest({ workspaceId: caller.workspace.id, keyId: "", scopes: [] }, form, null);
    const { plate } = await createPlate({ workspaceId: caller.workspace.id, keyId: "", scopes: [] }, { ...request, title: request.title }, null);
    await db().update(plates).set({ source: "editor", createdBy: caller.user.id }).where(eq(plates.id, plate.id));
    revalidatePath("/plates");
    return { ok: true, data: { plateId: plate.id } };
  } catch (err) {
    if (err instanceof AppError) return { ok: false, code: err.code, message: err.message };
    throw err;
  }
});

/** "Make again": the same parts, options, values and template version; the same bytes. */
export const remakePlateAction = guardedAction(z.object({ plateId: z.string().min(1) }), "plates:make", "making plates", async (input, caller) => {
  try {
    const plate = await remakePlate(caller.workspace.id, input.plateId, caller.user.id);
    revalidatePath("/plates");
    return { ok: true, data: { plateId: plate.id }, message: "Making the plate again: it appears in the list when it is built." };
  } catch (err) {
    if (err instanceof AppError) return { ok: false, code: err.code, message: err.message };
    throw err;
  }
});
