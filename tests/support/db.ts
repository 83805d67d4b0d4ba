import { randomBytes } from "node:crypto";
import pg from "pg";
import { databaseUrl } from "@/scripts/db-url.mjs";

export function testDatabaseUrl(): string {
  return process.env.DATABASE_URL ?? databaseUrl();
}

function withDatabase(url: string, name: string): string {
  const u = new URL(url);
  u.pathname = `/${name}`;
  return u.toString();
}

/** A brand-new empty database on the test server, and a way to drop it. */
export async function createScratchDatabase(): Promise<{ url: string; drop: () => Promise<void> }> {
  const name = `slab_scratch_${randomBytes(4).toString("hex")}`;
  const admin = new pg.Client({ connectionString: withDatabase(testDatabaseUrl(), "postgres") });
  await admin.connect();
  await admin.query(`create database ${name}`);
  await admin.end();
  return {
    url: withDatabase(testDatabaseUrl(), name),
    drop: async () => {
      const c = new pg.Client({ connectionString: withDatabase(testDatabaseUrl(), "postgres") });
      await c.connect();
      await c.query(`drop database if exists ${name} with (force)`);
      await c.end();
    },
  };
}
