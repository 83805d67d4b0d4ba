import { createHmac, randomBytes } from "node:crypto";
import { setWebhookSecret, webhookSecretOf } from "@/db/queries/workspaces";
import { systemActor, type WorkspaceActor } from "@/lib/auth/actor";
import { allowedHosts, postToTarget, resolveCallback, type CallbackRefusal, type PostOutcome, type Resolver } from "./callback-target";

/**
 * Webhooks of the plate API: POST of a JSON event, signed `Slabwright-Signature: t=<unix>,v1=<hex>`
 * where v1 = HMAC-SHA256(secret, "<t>.<body>") — the timestamp inside the signature lets a receiver
 * refuse replays. Only http(s) to global unicast addresses (lib/jobs/callback-target.ts); a host listed
 * in SLAB_WEBHOOK_ALLOW_HOSTS is called whatever its address (the tests list 127.0.0.1 and localhost).
 * Deliveries run from their own queue (lib/jobs/queue.ts `enqueueCallback`), never inside a build.
 */
export const SIGNATURE_HEADER = "Slabwright-Signature";

export function sign(secret: string, body: string, t = Math.floor(Date.now() / 1000)): string {
  return `t=${t},v1=${createHmac("sha256", secret).update(`${t}.${body}`).digest("hex")}`;
}

/** The workspace's signing secret, made on first use. */
export async function webhookSecret(actor: WorkspaceActor): Promise<string> {
  const existing = await webhookSecretOf(actor);
  if (existing) return existing;
  const secret = `whsec_${randomBytes(24).toString("base64url")}`;
  await setWebhookSecret(actor, secret);
  return secret;
}

/** Why a callback URL is refused (code, reason, message), or null when it may be called. */
export async function callbackProblem(raw: string, resolver?: Resolver): Promise<CallbackRefusal | null> {
  const r = await resolveCallback(raw, { resolver, allowHosts: allowedHosts() });
  return r.ok ? null : r.refusal;
}

export type CallbackJob = { workspaceId: string; url: string; body: string };

export type DeliveryOutcome =
  | { delivered: true; status: number }
  | { delivered: false; refused: CallbackRefusal }
  | { delivered: false; error: string; status?: number };

/**
 * One delivery attempt: resolve the host once, check every address, connect to the checked one, sign
 * now (a fresh timestamp for each attempt, as before). The queue retries a failed attempt.
 */
export async function deliverOnce(job: CallbackJob, opts: { timeoutMs: number; resolver?: Resolver }): Promise<DeliveryOutcome> {
  const r = await resolveCallback(job.url, { resolver: opts.resolver, allowHosts: allowedHosts() });
  if (!r.ok) return { delivered: false, refused: r.refusal };
  const secret = await webhookSecret(systemActor(job.workspaceId));
  const out: PostOutcome = await postToTarget(
    r.target,
    { "content-type": "application/json", [SIGNATURE_HEADER]: sign(secret, job.body) },
    job.body,
    opts.timeoutMs,
  );
  return out.ok ? { delivered: true, status: out.status } : { delivered: false, error: out.error, status: out.status };
}
