// The one rule for where the database is, shared by the shell scripts' callers, drizzle-kit and the app.
// DATABASE_URL wins; otherwise our own cluster on loopback (scripts/pg.sh) with SLAB_PG_PORT, as the
// superuser with the password scripts/pg.sh made for this installation (SLAB_PG_PASSWORD_FILE,
// default .data/pg-password). Plain Node: this file runs before node_modules exists.
import fs from "node:fs";
import path from "node:path";

export const DEFAULT_PG_PORT = 54329;

export function pgPort() {
  return Number(process.env.SLAB_PG_PORT ?? DEFAULT_PG_PORT);
}

export function databaseName() {
  return process.env.SLAB_DB_NAME ?? "slabwright";
}

export function pgPasswordFile() {
  return process.env.SLAB_PG_PASSWORD_FILE ?? path.resolve(".data", "pg-password");
}

/** The local cluster's password, or null before scripts/pg.sh has made one. */
export function pgPassword() {
  try {
    // The ignore comment: a file chosen at run time, not one for the build to trace.
    return fs.readFileSync(/* turbopackIgnore: true */ pgPasswordFile(), "utf8").trim() || null;
  } catch {
    return null;
  }
}

export function databaseUrl() {
  if (process.env.DATABASE_URL) return process.env.DATABASE_URL;
  const password = pgPassword();
  const user = password ? `postgres:${encodeURIComponent(password)}` : "postgres";
  return `postgres://${user}@127.0.0.1:${pgPort()}/${databaseName()}`;
}
