import "server-only";
import { and, asc, eq, inArray } from "drizzle-orm";
import { db } from "@/db";
import { kitParts, kits, parts } from "@/db/schema";
import { type Caller } from "@/lib/auth/guards";
import type { z } from "zod";
import type { kitSchema } from "@/lib/validation/kits";
import { NotFound, Invalid } from "@/lib/errors";

type KitData = z.output<typeof kitSchema>;

export async function getKit(caller: Caller, id: string) {
  const [kit] = await db().select().from(kits).where(and(eq(kits.id, id), eq(kits.workspaceId, caller.workspace.id)));
  if (!kit) return null;
  const lines = await db()
    .select({ partId: kitParts.partId, quantity: kitParts.quantity, rotation: kitParts.rotation, orientation: kitParts.orientation, name: parts.name })
    .from(kitParts)
    .innerJoin(parts, eq(parts.id, kitParts.partId))
    .where(eq(kitParts.kitId, kit.id))
    .orderBy(asc(kitParts.position));
  return { ...kit, lines };
}

export async function partChoices(caller: Caller) {
  return db().select({ id: parts.id, name: parts.name }).from(parts).where(eq(parts.workspaceId, caller.workspace.id)).orderBy(asc(parts.name));
}

/** Create or replace a kit and its lines in one transaction; every part must be the caller's workspace's. */
export async function saveKit(caller: Caller, data: KitData): Promise<string> {
  return db().transaction(async (tx) => {
    const ids = [...new Set(data.lines.map((l) => l.partId))];
    const found = await tx.select({ id: parts.id }).from(parts).where(and(inArray(parts.id, ids), eq(parts.workspaceId, caller.workspace.id)));
    if (found.length !== ids.length) throw new Invalid("unknown_part", "One of the chosen parts no longer exists.", undefined, "lines");
    let kitId = data.id;
    if (kitId) {
      const res = await tx
        .update(kits)
        .set({ name: data.name, description: data.description || null, updatedAt: new Date() })
        .where(and(eq(kits.id, kitId), eq(kits.workspaceId, caller.workspace.id)))
        .returning({ id: kits.id });
      if (!res[0]) throw new NotFound("not_found", "No such kit.");
      await tx.delete(kitParts).where(eq(kitParts.kitId, kitId));
    } else {
      const [row] = await tx.insert(kits).values({ workspaceId: caller.workspace.id, name: data.name, description: data.description || null, createdBy: caller.user.id }).returning({ id: kits.id });
      kitId = row!.id;
    }
    await tx.insert(kitParts).values(data.lines.map((l, position) => ({ kitId: kitId!, partId: l.partId, quantity: l.quantity, rotation: l.rotation, orientation: l.orientation, position })));
    return kitId!;
  });
}

export async function duplicateKit(caller: Caller, id: string): Promise<string> {
  const kit = await getKit(caller, id);
  if (!kit) throw new NotFound("not_found", "No such kit.");
  return saveKit(caller, { name: `${kit.name} (copy)`.slice(0, 120), description: kit.description ?? undefined, lines: kit.lines });
}

export async function archiveKit(caller: Caller, id: string): Promise<void> {
  const res = await db().update(kits).set({ archivedAt: new Date() }).where(and(eq(kits.id, id), eq(kits.workspaceId, caller.workspace.id))).returning({ id: kits.id });
  if (!res[0]) throw new NotFound("not_found", "No such kit.");
}
