import "server-only";
import { and, eq } from "drizzle-orm";
import { db } from "@/db";
import { plates } from "@/db/schema";
import type { Caller } from "@/lib/auth/guards";
import { notFound } from "@/lib/auth/errors";

/** A plate of the signed-in member's workspace (another workspace's is "not found"). */
export async function sessionPlate(caller: Caller, id: string) {
  const [p] = await db().select().from(plates).where(and(eq(plates.id, id), eq(plates.workspaceId, caller.workspace.id)));
  if (!p) throw notFound("plate");
  return p;
}
