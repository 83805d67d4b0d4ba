import "server-only";
import { and, asc, eq, inArray } from "drizzle-orm";
import { db } from "@/db";
import { kitParts, kits, parts } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { Tx } from "./tx";

/** Kits and their lines, within the actor's workspace (lib/kits composes the writes). */

/** A kit of the actor's workspace with its lines (and their parts' names) in kit order, or null. */
export async function getKit(actor: WorkspaceActor, id: string) {
  const [kit] = await db()
    .select()
    .from(kits)
    .where(and(eq(kits.id, id), eq(kits.workspaceId, actor.workspaceId)));
  if (!kit) return null;
  const lines = await db()
    .select({
      partId: kitParts.partId,
      quantity: kitParts.quantity,
      rotation: kitParts.rotation,
      orientation: kitParts.orientation,
      name: parts.name,
    })
    .from(kitParts)
    .innerJoin(parts, eq(parts.id, kitParts.partId))
    .where(and(eq(kitParts.kitId, kit.id), eq(parts.workspaceId, actor.workspaceId)))
    .orderBy(asc(kitParts.position));
  return { ...kit, lines };
}

/** The parts a kit line may use: the workspace's, by name. */
export async function partChoices(actor: WorkspaceActor) {
  return db()
    .select({ id: parts.id, name: parts.name })
    .from(parts)
    .where(eq(parts.workspaceId, actor.workspaceId))
    .orderBy(asc(parts.name));
}

/** How many of `ids` are parts of the actor's workspace. */
export async function countWorkspaceParts(tx: Tx, actor: WorkspaceActor, ids: string[]): Promise<number> {
  const found = await tx
    .select({ id: parts.id })
    .from(parts)
    .where(and(inArray(parts.id, ids), eq(parts.workspaceId, actor.workspaceId)));
  return found.length;
}

export type KitValues = { name: string; description: string | null };

/** Change a kit's name and description; false when the workspace has no such kit. */
export async function updateKit(tx: Tx, actor: WorkspaceActor, id: string, values: KitValues): Promise<boolean> {
  const res = await tx
    .update(kits)
    .set({ ...values, updatedAt: new Date() })
    .where(and(eq(kits.id, id), eq(kits.workspaceId, actor.workspaceId)))
    .returning({ id: kits.id });
  return Boolean(res[0]);
}

/** A new kit of the actor's workspace, made by the actor; its id. */
export async function insertKit(tx: Tx, actor: WorkspaceActor, values: KitValues): Promise<string> {
  const [row] = await tx
    .insert(kits)
    .values({ workspaceId: actor.workspaceId, ...values, createdBy: actor.userId })
    .returning({ id: kits.id });
  return row!.id;
}

export type KitLine = Omit<typeof kitParts.$inferInsert, "kitId" | "position">;

/** Replace a kit's lines by `lines`, in that order (the kit was just inserted or updated in this transaction). */
export async function replaceKitLines(tx: Tx, kitId: string, lines: KitLine[], opts: { fresh?: boolean } = {}): Promise<void> {
  if (!opts.fresh) await tx.delete(kitParts).where(eq(kitParts.kitId, kitId));
  await tx.insert(kitParts).values(lines.map((l, position) => ({ ...l, kitId, position })));
}

/** Archive a kit; false when the workspace has no such kit. */
export async function archiveKitRow(actor: WorkspaceActor, id: string): Promise<boolean> {
  const res = await db()
    .update(kits)
    .set({ archivedAt: new Date() })
    .where(and(eq(kits.id, id), eq(kits.workspaceId, actor.workspaceId)))
    .returning({ id: kits.id });
  return Boolean(res[0]);
}

/**
 * Keep the slab editor's settings with a kit of the actor's workspace (unchecked here: the service
 * checks them); false when the workspace has no such kit. The kit's updated time stays: settings
 * saved as the designer works are not an edit of the kit's parts.
 */
export async function setKitSlabSettings(actor: WorkspaceActor, id: string, settings: unknown): Promise<boolean> {
  const res = await db()
    .update(kits)
    .set({ slabSettings: settings })
    .where(and(eq(kits.id, id), eq(kits.workspaceId, actor.workspaceId)))
    .returning({ id: kits.id });
  return Boolean(res[0]);
}
