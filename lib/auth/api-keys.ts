import { createHash, randomBytes } from "node:crypto";

/**
 * API keys look like `swk_<8 hex prefix>_<43 url-safe chars>`. The prefix identifies a key in lists;
 * only the SHA-256 of the whole key is stored (a key has 256 bits of entropy, so a fast hash is enough).
 */
export function generateApiKey(): { key: string; prefix: string; hash: string } {
  const prefix = randomBytes(4).toString("hex");
  const secret = randomBytes(32).toString("base64url");
  const key = `swk_${prefix}_${secret}`;
  return { key, prefix, hash: hashApiKey(key) };
}

export function hashApiKey(key: string): string {
  return createHash("sha256").update(key, "utf8").digest("hex");
}

export function parseApiKeyPrefix(key: string): string | null {
  const m = /^swk_([0-9a-f]{8})_[A-Za-z0-9_-]{43}$/.exec(key);
  return m ? m[1]! : null;
}
