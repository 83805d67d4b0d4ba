import type pg from "pg";
import { APP_VERSION } from "./version";

export type Health = { status: "ok" | "degraded"; db: "ok" | "down"; version: string };

/** Ask the database for one row, with a short deadline so a dead server answers quickly. */
export async function checkHealth(pool: pg.Pool, timeoutMs = 2000): Promise<{ httpStatus: 200 | 503; body: Health }> {
  let dbOk: boolean;
  try {
    const query = pool.query("select 1 as ok");
    const timeout = new Promise<never>((_, reject) => setTimeout(() => reject(new Error("db timeout")), timeoutMs).unref());
    const res = await Promise.race([query, timeout]);
    dbOk = res.rows[0]?.ok === 1;
  } catch {
    dbOk = false;
  }
  return dbOk
    ? { httpStatus: 200, body: { status: "ok", db: "ok", version: APP_VERSION } }
    : { httpStatus: 503, body: { status: "degraded", db: "down", version: APP_VERSION } };
}
