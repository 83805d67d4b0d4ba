import path from "node:path";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import type pg from "pg";
import { createDb } from "./index";

export const MIGRATIONS_FOLDER = path.join(process.cwd(), "db", "migrations");

/** Apply every pending migration in one transaction (drizzle's migrator); a no-op when none are pending. */
export async function applyMigrations(pool: pg.Pool): Promise<void> {
  await migrate(createDb(pool), { migrationsFolder: MIGRATIONS_FOLDER });
}
