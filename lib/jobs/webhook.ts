import { createHmac, randomBytes } from "node:crypto";
import { lookup } from "node:dns/promises";
import { isIP } from "node:net";
import { eq } from "drizzle-orm";
import { db } from "@/db";
import { workspaces } from "@/db/schema";

/**
 * Webhooks of the plate API: POST of a JSON event, signed `Slabwright-Signature: t=<unix>,v1=<hex>`
 * where v1 = HMAC-SHA256(secret, "<t>.<body>") — the timestamp inside the signature lets a receiver
 * refuse replays. Only http(s); private, loopback and link-local addresses are refused unless their
 * host is listed in SLAB_WEBHOOK_ALLOW_HOSTS (the tests list 127.0.0.1).
 */
export const SIGNATURE_HEADER = "Slabwright-Signature";

export function sign(secret: string, body: string, t = Math.floor(Date.now() / 1000)): string {
  return `t=${t},v1=${createHmac("sha256", secret).update(`${t}.${body}`).digest("hex")}`;
}

export async function webhookSecret(workspaceId: string): Promise<string> {
  const [ws] = await db().select({ secret: workspaces.webhookSecret }).from(workspaces).where(eq(workspaces.id, workspaceId));
  if (ws?.secret) return ws.secret;
  const secret = `whsec_${randomBytes(24).toString("base64url")}`;
  await db().update(workspaces).set({ webhookSecret: secret }).where(eq(workspaces.id, workspaceId));
  return secret;
}

function allowedHosts(): string[] {
  return (process.env.SLAB_WEBHOOK_ALLOW_HOSTS ?? "").split(",").map((h) => h.trim().toLowerCase()).filter(Boolean);
}

function isPrivate(ip: string): boolean {
  if (ip === "::1" || ip.startsWith("fe80:") || ip.startsWith("fc") || ip.startsWith("fd")) return true;
  const v4 = ip.startsWith("::ffff:") ? ip.slice(7) : ip;
  const p = v4.split(".").map(Number);
  if (p.length !== 4) return false;
  const [a, b] = p as [number, number, number, number];
  return a === 10 || a === 127 || a === 0 || (a === 169 && b === 254) || (a === 172 && b >= 16 && b <= 31) || (a === 192 && b === 168) || (a === 100 && b >= 64 && b <= 127);
}

/** Why a callback URL is refused, or null when it may be called. */
export async function callbackProblem(raw: string): Promise<string | null> {
  let url: URL;
  try {
    url = new URL(raw);
  } catch {
    return "callbackUrl is not a URL";
  }
  if (url.protocol !== "http:" && url.protocol !== "https:") return "callbackUrl must be http or https";
  const host = url.hostname.replace(/^\[|\]$/g, "").toLowerCase();
  if (allowedHosts().includes(host)) return null;
  const addresses = isIP(host) ? [host] : (await lookup(host, { all: true }).catch(() => [])).map((a) => a.address);
  if (addresses.length === 0) return "callbackUrl's host does not resolve";
  if (addresses.some(isPrivate)) return "callbackUrl points at a private or loopback address, which is not allowed";
  return null;
}

/** Deliver an event, retrying with backoff (0.5 s, 2 s, 8 s) on failure or a non-2xx answer. */
export async function deliver(workspaceId: string, url: string, event: Record<string, unknown>, delays = [500, 2000, 8000]): Promise<boolean> {
  if (await callbackProblem(url)) return false;
  const secret = await webhookSecret(workspaceId);
  const body = JSON.stringify(event);
  for (let attempt = 0; attempt <= delays.length; attempt++) {
    try {
      const res = await fetch(url, { method: "POST", headers: { "content-type": "application/json", [SIGNATURE_HEADER]: sign(secret, body) }, body, signal: AbortSignal.timeout(10_000), redirect: "manual" });
      if (res.ok) return true;
    } catch {
      // try again after the pause
    }
    if (attempt < delays.length) await new Promise((r) => setTimeout(r, delays[attempt]));
  }
  return false;
}
