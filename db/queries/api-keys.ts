import "server-only";
import { and, desc, eq, isNull, lt, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { apiKeys, type ApiKeyScope } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { Tx } from "./tx";

/** API keys of a workspace, within the actor's workspace; a key sent with a request is looked up by its hash alone. */

/** A new key of the actor's workspace, made by the actor; its id. */
export async function insertApiKey(
  tx: Tx,
  actor: WorkspaceActor,
  values: { name: string; prefix: string; keyHash: string; scopes: ApiKeyScope[]; createdBy: string },
): Promise<string> {
  const [row] = await tx
    .insert(apiKeys)
    .values({ workspaceId: actor.workspaceId, ...values })
    .returning({ id: apiKeys.id });
  return row!.id;
}

/** The workspace's keys (never their hashes), newest first. */
export async function apiKeyRows(actor: WorkspaceActor) {
  return db()
    .select({
      id: apiKeys.id,
      name: apiKeys.name,
      prefix: apiKeys.prefix,
      scopes: apiKeys.scopes,
      createdAt: apiKeys.createdAt,
      lastUsedAt: apiKeys.lastUsedAt,
      revokedAt: apiKeys.revokedAt,
    })
    .from(apiKeys)
    .where(eq(apiKeys.workspaceId, actor.workspaceId))
    .orderBy(desc(apiKeys.createdAt));
}

/** How many keys of the workspace still work. */
export async function activeApiKeyCount(actor: WorkspaceActor): Promise<number> {
  const [held] = await db()
    .select({ n: sql<number>`count(*)::int` })
    .from(apiKeys)
    .where(and(eq(apiKeys.workspaceId, actor.workspaceId), isNull(apiKeys.revokedAt)));
  return held!.n;
}

/** Revoke an active key; its name and prefix, or null when there is no such active key. */
export async function revokeApiKeyRow(tx: Tx, actor: WorkspaceActor, id: string): Promise<{ name: string; prefix: string } | null> {
  const res = await tx
    .update(apiKeys)
    .set({ revokedAt: new Date() })
    .where(and(eq(apiKeys.id, id), eq(apiKeys.workspaceId, actor.workspaceId), isNull(apiKeys.revokedAt)))
    .returning({ name: apiKeys.name, prefix: apiKeys.prefix });
  return res[0] ?? null;
}

/** The active key with this hash (what a request's Bearer key stands for), or null. */
export async function activeApiKeyByHash(keyHash: string) {
  const [row] = await db()
    .select({ id: apiKeys.id, workspaceId: apiKeys.workspaceId, scopes: apiKeys.scopes, lastUsedAt: apiKeys.lastUsedAt })
    .from(apiKeys)
    .where(and(eq(apiKeys.keyHash, keyHash), isNull(apiKeys.revokedAt)))
    .limit(1);
  return row ?? null;
}

/** Note that the actor's key was used now, at most once a minute (no write on every request). */
export async function touchApiKey(actor: WorkspaceActor & { apiKeyId: string }): Promise<void> {
  const minuteAgo = new Date(Date.now() - 60_000);
  await db()
    .update(apiKeys)
    .set({ lastUsedAt: new Date() })
    .where(
      and(
        eq(apiKeys.id, actor.apiKeyId),
        eq(apiKeys.workspaceId, actor.workspaceId),
        or(isNull(apiKeys.lastUsedAt), lt(apiKeys.lastUsedAt, minuteAgo)),
      ),
    );
}
