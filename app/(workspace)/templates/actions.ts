"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { guardedAction, type Caller } from "@/lib/auth/guards";
import {
  createTemplate,
  duplicateTemplate,
  renameTemplate,
  restoreVersion,
  saveVersion,
  setArchived,
  type Actor,
} from "@/lib/templates/service";

const actor = (c: Caller): Actor => ({ ...c, email: c.user.email });
const body = z.object({ options: z.record(z.string(), z.unknown()), variables: z.array(z.record(z.string(), z.unknown())).max(20) });
const name = z.string().trim().min(1, "Give the template a name.").max(80, "At most 80 characters.");
const description = z.string().trim().max(500, "At most 500 characters.").default("");

const refresh = (id?: string) => {
  revalidatePath("/templates");
  if (id) revalidatePath(`/templates/${id}`);
};

/** "Save these options as a template" in the slab editor. */
export const createTemplateAction = guardedAction(
  z.object({ name, description, body }),
  "templates:write",
  "saving templates",
  async (input, caller) => {
    const t = await createTemplate(actor(caller), { name: input.name, description: input.description, body: input.body });
    refresh(t.id);
    return { ok: true, data: { id: t.id, version: 1 }, message: `Template “${input.name}” saved as version 1.` };
  },
);

/** Editing a template adds a version; the old ones stay as they were. */
export const saveTemplateVersionAction = guardedAction(
  z.object({ id: z.string().min(1), body, note: z.string().trim().max(200).optional() }),
  "templates:write",
  "saving templates",
  async (input, caller) => {
    const v = await saveVersion(actor(caller), input.id, { body: input.body, note: input.note || undefined });
    refresh(input.id);
    return { ok: true, data: { id: input.id, version: v.version }, message: `Saved as version ${v.version}.` };
  },
);

export const restoreTemplateVersionAction = guardedAction(
  z.object({ id: z.string().min(1), version: z.number().int().min(1) }),
  "templates:write",
  "restoring template versions",
  async (input, caller) => {
    const v = await restoreVersion(actor(caller), input.id, input.version);
    refresh(input.id);
    return { ok: true, data: { version: v.version }, message: `Version ${input.version} restored as version ${v.version}.` };
  },
);

export const duplicateTemplateAction = guardedAction(
  z.object({ id: z.string().min(1) }),
  "templates:write",
  "duplicating templates",
  async (input, caller) => {
    const t = await duplicateTemplate(actor(caller), input.id);
    refresh(t.id);
    return { ok: true, data: { id: t.id }, message: "Template duplicated." };
  },
);

export const archiveTemplateAction = guardedAction(
  z.object({ id: z.string().min(1), archived: z.boolean() }),
  "templates:write",
  "archiving templates",
  async (input, caller) => {
    await setArchived(actor(caller), input.id, input.archived);
    refresh(input.id);
    return { ok: true, data: undefined, message: input.archived ? "Template archived." : "Template back in the gallery." };
  },
);

export const renameTemplateAction = guardedAction(
  z.object({ id: z.string().min(1), name, description }),
  "templates:write",
  "renaming templates",
  async (input, caller) => {
    await renameTemplate(actor(caller), input.id, input.name, input.description);
    refresh(input.id);
    return { ok: true, data: undefined, message: "Template renamed." };
  },
);
