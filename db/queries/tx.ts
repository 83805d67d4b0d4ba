import { db } from "@/db";

// The worker runs its transactions through here too, so no server-only import.

/** A transaction handle: queries that must commit together take it as their first argument. */
export type Tx = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];

/** Run `fn` in one transaction: all of its writes land, or none (services compose queries with it). */
export function transaction<T>(fn: (tx: Tx) => Promise<T>): Promise<T> {
  return db().transaction(fn);
}

/**
 * Whether `err` (or what it wraps: drizzle puts the driver's error in `cause`) is PostgreSQL's
 * unique_violation (SQLSTATE 23505) on the index or constraint `name`. The statement has then aborted
 * the transaction: the caller throws its own refusal and the transaction rolls back.
 */
export function isUniqueViolation(err: unknown, name: string): boolean {
  for (let e: unknown = err, depth = 0; e && typeof e === "object" && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const { code, constraint } = e as { code?: unknown; constraint?: unknown };
    if (code === "23505") return constraint === name;
  }
  return false;
}
