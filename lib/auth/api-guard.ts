import "server-only";
import type { ApiKeyScope } from "@/db/schema";
import { activeApiKeyByHash, touchApiKey } from "@/db/queries/api-keys";
import type { WorkspaceActor } from "./actor";
import { hashApiKey, parseApiKeyPrefix } from "./api-keys";
import { billingOf } from "@/lib/billing/service";
import { rateLimited } from "./errors";
import { hit } from "./rate-limit";
import { Unauthorized, PlanLimit, Forbidden } from "@/lib/errors";

/** An order system acting through one of the workspace's API keys. */
export type ApiCaller = WorkspaceActor & { apiKeyId: string; userId: null };

/**
 * The caller of a public API route: `Authorization: Bearer <key>`, looked up by hash on every request
 * (a revoked key is refused at once), with the scope the route needs and a per-key rate limit.
 */
export async function requireApiKey(req: Request, scope: ApiKeyScope): Promise<ApiCaller> {
  const header = req.headers.get("authorization") ?? "";
  const m = /^Bearer\s+(\S+)$/i.exec(header);
  if (!m) throw new Unauthorized("unauthorized", "Send an API key as `Authorization: Bearer <key>`.");
  const key = m[1]!;
  if (!parseApiKeyPrefix(key)) throw new Unauthorized("unauthorized", "That is not a Slabwright API key.");
  const row = await activeApiKeyByHash(hashApiKey(key));
  if (!row) throw new Unauthorized("unauthorized", "This API key is unknown or has been revoked.");
  const limit = await hit("apiPerKey", row.id);
  if (!limit.ok) throw rateLimited(limit.retryAfter, "requests with this key");
  if (!row.scopes.includes(scope)) throw new Forbidden("forbidden", `This key lacks the ${scope} scope.`);
  const actor: ApiCaller = { workspaceId: row.workspaceId, userId: null, apiKeyId: row.id, permissions: row.scopes };
  // The order API comes with the paid plans: a workspace moved to Bench keeps its keys, refused here.
  const plan = (await billingOf(actor)).effective;
  if (plan.apiKeys === 0)
    throw new PlanLimit(
      "plan_limit",
      `The ${plan.name} plan has no order API. An owner can upgrade under Settings → Billing; the workspace's keys work again at once.`,
      { plan: plan.id },
    );
  // Last-used time, at most once a minute per key (no write on every request).
  await touchApiKey(actor);
  return actor;
}
