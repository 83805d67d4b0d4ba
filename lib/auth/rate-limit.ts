import "server-only";
import { RateLimiterPostgres, RateLimiterRes } from "rate-limiter-flexible";
import { pool } from "@/db";

/**
 * Abuse limits, counted in PostgreSQL by rate-limiter-flexible (table `abuse_counters`, made by our
 * migrations) so every app and worker process sees the same numbers.
 */
export type Limit = { points: number; durationSeconds: number };

export const LIMITS = {
  /** Wrong passwords from one client address: a hard stop until the window ends. */
  signInFailuresPerIp: { points: 100, durationSeconds: 15 * 60 },
  /**
   * Wrong passwords for one account from anywhere: the first ones are free, then every further one
   * makes the account wait longer (see signInDelaySeconds) — it slows guessing without locking the
   * owner out, who can always sign in by an e-mailed link.
   */
  signInFailuresPerAccount: { points: 1_000, durationSeconds: 60 * 60 },
  /** Mail of the sign-in, sign-up and reset forms, per address and per client. */
  mailsPerAddress: { points: 3, durationSeconds: 10 * 60 },
  mailsPerIp: { points: 20, durationSeconds: 10 * 60 },
  signUpsPerIp: { points: 10, durationSeconds: 60 * 60 },
  invitationsPerWorkspace: { points: 20, durationSeconds: 60 * 60 },
  passwordResetsPerAccount: { points: 3, durationSeconds: 60 * 60 },
  apiPerKey: { points: 120, durationSeconds: 60 },
} as const satisfies Record<string, Limit>;

export type LimitName = keyof typeof LIMITS;

/** Free wrong passwords per account before the delays start. */
export const FREE_SIGN_IN_FAILURES = 10;
/** The longest wait the account delay asks for. */
export const MAX_SIGN_IN_DELAY_S = 15 * 60;

/** Seconds an account must wait after its n-th wrong password in the window: 0, then 1, 2, 4, … (capped). */
export function signInDelaySeconds(failures: number): number {
  if (failures <= FREE_SIGN_IN_FAILURES) return 0;
  return Math.min(MAX_SIGN_IN_DELAY_S, 2 ** (failures - FREE_SIGN_IN_FAILURES - 1));
}

const g = globalThis as unknown as { __slabLimiters?: Map<string, RateLimiterPostgres> };

function limiter(name: LimitName | "signInWait"): RateLimiterPostgres {
  g.__slabLimiters ??= new Map();
  let l = g.__slabLimiters.get(name);
  if (!l) {
    const spec = name === "signInWait" ? { points: 1, durationSeconds: MAX_SIGN_IN_DELAY_S } : LIMITS[name];
    l = new RateLimiterPostgres({
      storeClient: pool(),
      storeType: "pool",
      tableName: "abuse_counters",
      tableCreated: true,
      // Expired rows are dropped by pruneRateLimits, not by a timer that would keep processes alive.
      clearExpiredByTimeout: false,
      keyPrefix: name,
      points: spec.points,
      duration: spec.durationSeconds,
    });
    g.__slabLimiters.set(name, l);
  }
  return l;
}

const secondsOf = (ms: number) => Math.max(1, Math.ceil(ms / 1000));

/** Count one event against `key`; says whether it is still within the limit and when it frees up. */
export async function hit(name: LimitName, key: string): Promise<{ ok: boolean; count: number; retryAfter: number }> {
  try {
    const res = await limiter(name).consume(key);
    return { ok: true, count: res.consumedPoints, retryAfter: secondsOf(res.msBeforeNext) };
  } catch (err) {
    if (err instanceof RateLimiterRes) return { ok: false, count: err.consumedPoints, retryAfter: secondsOf(err.msBeforeNext) };
    throw err;
  }
}

/** Whether `key` is already at its limit, without counting (to refuse before doing the work). */
export async function isBlocked(name: LimitName, key: string): Promise<{ blocked: boolean; count: number; retryAfter: number }> {
  const res = await limiter(name).get(key);
  if (!res) return { blocked: false, count: 0, retryAfter: 0 };
  return { blocked: res.consumedPoints >= LIMITS[name].points, count: res.consumedPoints, retryAfter: secondsOf(res.msBeforeNext) };
}

/** The wait an account is under after wrong passwords, in seconds (0 when none). */
export async function signInWait(email: string): Promise<number> {
  const res = await limiter("signInWait").get(email);
  return res && res.consumedPoints > 0 && res.msBeforeNext > 0 ? secondsOf(res.msBeforeNext) : 0;
}

/** Count a wrong password for an account and its client, and start the account's wait when one is due. */
export async function signInFailed(email: string, ip: string): Promise<void> {
  const [acct] = await Promise.all([hit("signInFailuresPerAccount", email), hit("signInFailuresPerIp", ip)]);
  const wait = signInDelaySeconds(acct.count);
  if (wait > 0) await limiter("signInWait").block(email, wait);
}

/** A right password clears the account's wait (not the per-client count). */
export async function signInSucceeded(email: string): Promise<void> {
  await Promise.all([limiter("signInWait").delete(email), limiter("signInFailuresPerAccount").delete(email)]);
}

/** Drop counters that ran out over a day ago. */
export async function pruneRateLimits(): Promise<void> {
  await pool().query("delete from abuse_counters where expire < $1", [Date.now() - 86_400_000]);
}
