"use server";

import { revalidatePath } from "next/cache";
import { archiveKit, duplicateKit, saveKit } from "@/db/queries/kits";
import { guardedAction } from "@/lib/auth/guards";
import { idSchema } from "@/lib/validation/accounts";
import { kitSchema } from "@/lib/validation/kits";

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
