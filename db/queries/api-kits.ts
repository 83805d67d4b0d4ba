import "server-only";
import { and, asc, eq, isNull } from "drizzle-orm";
import { db } from "@/db";
import { kitParts, kits, parts } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";

// Reads for API callers: always scoped to the key's workspace (the actor's).

export async function apiListKits(actor: WorkspaceActor) {
  return db()
    .select({ id: kits.id, name: kits.name, description: kits.description, updatedAt: kits.updatedAt })
    .from(kits)
    .where(and(eq(kits.workspaceId, actor.workspaceId), isNull(kits.archivedAt)))
    .orderBy(asc(kits.name));
}

export async function apiGetKit(actor: WorkspaceActor, id: string) {
  const [kit] = await db()
    .select({ id: kits.id, name: kits.name, description: kits.description, updatedAt: kits.updatedAt })
    .from(kits)
    .where(and(eq(kits.id, id), eq(kits.workspaceId, actor.workspaceId)));
  if (!kit) return null;
  const lines = await db()
    .select({
      partId: parts.id,
      name: parts.name,
      quantity: kitParts.quantity,
      rotation: kitParts.rotation,
      orientation: kitParts.orientation,
      triangles: parts.triangles,
    })
    .from(kitParts)
    .innerJoin(parts, eq(parts.id, kitParts.partId))
    .where(and(eq(kitParts.kitId, kit.id), eq(parts.workspaceId, actor.workspaceId)))
    .orderBy(asc(kitParts.position));
  return { ...kit, parts: lines };
}
