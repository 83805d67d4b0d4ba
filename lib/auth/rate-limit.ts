import "server-only";
import { sql } from "drizzle-orm";
import { db } from "@/db";

export type Limit = { limit: number; windowSeconds: number };

/** Abuse limits (fixed windows, counted in PostgreSQL so every app process sees the same numbers). */
export const LIMITS = {
  signInPerAccount: { limit: 8, windowSeconds: 15 * 60 },
  signInPerIp: { limit: 30, windowSeconds: 15 * 60 },
  invitationsPerWorkspace: { limit: 20, windowSeconds: 60 * 60 },
  passwordResetsPerAccount: { limit: 3, windowSeconds: 60 * 60 },
  apiPerKey: { limit: 120, windowSeconds: 60 },
} as const satisfies Record<string, Limit>;

function windowStart(l: Limit, now: number) {
  return new Date(Math.floor(now / (l.windowSeconds * 1000)) * l.windowSeconds * 1000);
}

/** Count one event against `key`; says whether it is still within the limit and when the window ends. */
export async function hit(key: string, l: Limit, now = Date.now()): Promise<{ ok: boolean; count: number; retryAfter: number }> {
  const start = windowStart(l, now);
  const res = await db().execute<{ count: number }>(sql`
    insert into rate_limits (key, window_start, count) values (${key}, ${start.toISOString()}, 1)
    on conflict (key, window_start) do update set count = rate_limits.count + 1
    returning count`);
  const count = Number(res.rows[0]?.count ?? 1);
  const retryAfter = Math.max(1, Math.ceil((start.getTime() + l.windowSeconds * 1000 - now) / 1000));
  return { ok: count <= l.limit, count, retryAfter };
}

/** Whether `key` is already over its limit, without counting (for refusing before the work). */
export async function isBlocked(key: string, l: Limit, now = Date.now()): Promise<{ blocked: boolean; retryAfter: number }> {
  const start = windowStart(l, now);
  const res = await db().execute<{ count: number }>(sql`select count from rate_limits where key = ${key} and window_start = ${start.toISOString()}`);
  const count = Number(res.rows[0]?.count ?? 0);
  return { blocked: count >= l.limit, retryAfter: Math.max(1, Math.ceil((start.getTime() + l.windowSeconds * 1000 - now) / 1000)) };
}

/** Drop windows that ended over a day ago. */
export async function pruneRateLimits(): Promise<void> {
  await db().execute(sql`delete from rate_limits where window_start < now() - interval '1 day'`);
}
