import "server-only";
import type { z } from "zod";
import { archiveKitRow, countWorkspaceParts, getKit, insertKit, replaceKitLines, setKitSlabSettings, updateKit } from "@/db/queries/kits";
import { transaction } from "@/db/queries/tx";
import type { WorkspaceActor } from "@/lib/auth/actor";
import { Invalid, NotFound } from "@/lib/errors";
import type { KitSlabSettings, kitSchema } from "@/lib/validation/kits";

type KitData = z.output<typeof kitSchema>;

/** Create or replace a kit and its lines in one transaction; every part must be the actor's workspace's. */
export async function saveKit(actor: WorkspaceActor, data: KitData): Promise<string> {
  return transaction(async (tx) => {
    const ids = [...new Set(data.lines.map((l) => l.partId))];
    if ((await countWorkspaceParts(tx, actor, ids)) !== ids.length)
      throw new Invalid("unknown_part", "One of the chosen parts no longer exists.", undefined, "lines");
    const values = { name: data.name, description: data.description || null };
    let kitId = data.id;
    if (kitId) {
      if (!(await updateKit(tx, actor, kitId, values))) throw new NotFound("not_found", "No such kit.");
    } else {
      kitId = await insertKit(tx, actor, values);
    }
    await replaceKitLines(
      tx,
      kitId,
      data.lines.map((l) => ({ partId: l.partId, quantity: l.quantity, rotation: l.rotation, orientation: l.orientation })),
      { fresh: !data.id },
    );
    return kitId;
  });
}

export async function duplicateKit(actor: WorkspaceActor, id: string): Promise<string> {
  const kit = await getKit(actor, id);
  if (!kit) throw new NotFound("not_found", "No such kit.");
  return saveKit(actor, { name: `${kit.name} (copy)`.slice(0, 120), description: kit.description ?? undefined, lines: kit.lines });
}

export async function archiveKit(actor: WorkspaceActor, id: string): Promise<void> {
  if (!(await archiveKitRow(actor, id))) throw new NotFound("not_found", "No such kit.");
}

/** Keep the slab editor's settings (already checked by `kitSlabSettingsSchema`) with a kit of the actor's workspace. */
export async function saveSlabSettings(actor: WorkspaceActor, kitId: string, settings: KitSlabSettings): Promise<void> {
  if (!(await setKitSlabSettings(actor, kitId, settings))) throw new NotFound("not_found", "No such kit.");
}
