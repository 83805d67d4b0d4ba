// The one rule for where the database is, shared by the shell scripts' callers, drizzle-kit and the app.
// DATABASE_URL wins; otherwise our own cluster on loopback (scripts/pg.sh) with SLAB_PG_PORT.
export const DEFAULT_PG_PORT = 54329;

export function pgPort() {
  return Number(process.env.SLAB_PG_PORT ?? DEFAULT_PG_PORT);
}

export function databaseName() {
  return process.env.SLAB_DB_NAME ?? "slabwright";
}

export function databaseUrl() {
  if (process.env.DATABASE_URL) return process.env.DATABASE_URL;
  return `postgres://postgres@127.0.0.1:${pgPort()}/${databaseName()}`;
}
