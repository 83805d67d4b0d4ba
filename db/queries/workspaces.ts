import { eq } from "drizzle-orm";
import { db } from "@/db";
import { workspaces } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";

/**
 * Workspaces: the rows themselves, within the actor's own. The worker reads the webhook secret
 * through here when it signs a delivery, so no server-only import.
 */

/** The workspace's webhook signing secret, or null before the first is made. */
export async function webhookSecretOf(actor: WorkspaceActor): Promise<string | null> {
  const [ws] = await db().select({ secret: workspaces.webhookSecret }).from(workspaces).where(eq(workspaces.id, actor.workspaceId));
  return ws?.secret ?? null;
}

export async function setWebhookSecret(actor: WorkspaceActor, secret: string): Promise<void> {
  await db().update(workspaces).set({ webhookSecret: secret }).where(eq(workspaces.id, actor.workspaceId));
}
