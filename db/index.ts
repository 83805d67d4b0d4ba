import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import { env } from "@/lib/env";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema>;

export function createPool(url: string): pg.Pool {
  const p = new pg.Pool({ connectionString: url, max: 10, connectionTimeoutMillis: 3000, idleTimeoutMillis: 30_000 });
  // An idle connection closed by the server (a restart, a shutdown) is dropped from the pool and
  // replaced on the next query; without a listener the pool's "error" event would end the process.
  p.on("error", (err) => console.warn(`database: an idle connection closed (${err.message})`));
  return p;
}

export function createDb(pool: pg.Pool): Db {
  return drizzle(pool, { schema });
}

// One pool per server process; kept on globalThis so dev-mode module reloads do not open new pools.
const g = globalThis as unknown as { __slabPool?: pg.Pool; __slabDb?: Db };

export function pool(): pg.Pool {
  g.__slabPool ??= createPool(env().DATABASE_URL);
  return g.__slabPool;
}

export function db(): Db {
  g.__slabDb ??= createDb(pool());
  return g.__slabDb;
}

export { schema };
