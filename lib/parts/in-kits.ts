import { and, eq, inArray } from "drizzle-orm";
import { db } from "@/db";
import { kitParts, kits } from "@/db/schema";

type Reader = Pick<ReturnType<typeof db>, "selectDistinct">;

/**
 * Why a part cannot be split or deleted now: the kits of its workspace that use it, as the message
 * the library shows, or null when none does. Used by the web process and by the worker (which checks
 * again inside the transaction that replaces the part), so no server-only import here.
 */
export async function inKitsRefusal(q: Reader, workspaceId: string, ids: string[], verb: string): Promise<string | null> {
  const using = await q
    .selectDistinct({ name: kits.name })
    .from(kitParts)
    .innerJoin(kits, eq(kits.id, kitParts.kitId))
    .where(and(inArray(kitParts.partId, ids), eq(kits.workspaceId, workspaceId)));
  if (!using.length) return null;
  const names = using.map((k) => `“${k.name}”`).join(", ");
  return `This part is used by ${using.length === 1 ? "the kit" : "the kits"} ${names}; take it out of ${using.length === 1 ? "that kit" : "those kits"} before you ${verb} it.`;
}
