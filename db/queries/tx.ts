import { db } from "@/db";

// The worker runs its transactions through here too, so no server-only import.

/** A transaction handle: queries that must commit together take it as their first argument. */
export type Tx = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];

/** Run `fn` in one transaction: all of its writes land, or none (services compose queries with it). */
export function transaction<T>(fn: (tx: Tx) => Promise<T>): Promise<T> {
  return db().transaction(fn);
}
