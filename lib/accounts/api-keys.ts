import "server-only";
import type { ApiKeyScope } from "@/db/schema";
import { apiKeyRows, insertApiKey, revokeApiKeyRow } from "@/db/queries/api-keys";
import { transaction } from "@/db/queries/tx";
import type { WorkspaceActor } from "@/lib/auth/actor";
import { generateApiKey } from "@/lib/auth/api-keys";
import { audit } from "@/lib/audit";
import { NotFound } from "@/lib/errors";

/** A workspace's API keys: made by a member (shown once), listed without their secret, revoked. */

export async function createApiKey(
  actor: WorkspaceActor & { userId: string },
  name: string,
  scopes: ApiKeyScope[],
): Promise<{ id: string; key: string; prefix: string }> {
  const k = generateApiKey();
  const id = await transaction(async (tx) => {
    const id = await insertApiKey(tx, actor, { name, prefix: k.prefix, keyHash: k.hash, scopes, createdBy: actor.userId });
    await audit(
      {
        workspaceId: actor.workspaceId,
        actorUserId: actor.userId,
        action: "api_key_created",
        target: `${name} (swk_${k.prefix}…)`,
        details: { scopes },
      },
      tx,
    );
    return id;
  });
  return { id, key: k.key, prefix: k.prefix };
}

export async function listApiKeys(actor: WorkspaceActor) {
  return apiKeyRows(actor);
}

export async function revokeApiKey(actor: WorkspaceActor, id: string): Promise<void> {
  await transaction(async (tx) => {
    const key = await revokeApiKeyRow(tx, actor, id);
    if (!key) throw new NotFound("not_found", "No such active key.");
    await audit(
      { workspaceId: actor.workspaceId, actorUserId: actor.userId, action: "api_key_revoked", target: `${key.name} (swk_${key.prefix}…)` },
      tx,
    );
  });
}
