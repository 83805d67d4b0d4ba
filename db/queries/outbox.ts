import "server-only";
import { desc, eq, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { devOutbox } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";

/**
 * The demo outbox (mail caught by the local fake SMTP server), newest first: mail addressed to
 * `address`, and with `workspaceMail` also the mail sent for the actor's workspace.
 */
export async function outboxRows(actor: WorkspaceActor, q: { address: string; workspaceMail: boolean; limit: number }) {
  const mine = sql`${q.address.toLowerCase()} = any(string_to_array(${devOutbox.toAddresses}, ', '))`;
  const where = q.workspaceMail ? or(eq(devOutbox.workspaceId, actor.workspaceId), mine) : mine;
  return db().select().from(devOutbox).where(where).orderBy(desc(devOutbox.receivedAt)).limit(q.limit);
}
