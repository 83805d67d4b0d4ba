import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type pg from "pg";
import { createPool } from "@/db";
import { applyMigrations } from "@/db/migrate";
import { DEMO_USERS, seedDemo } from "@/db/seed";
import { hashApiKey, parseApiKeyPrefix } from "@/lib/auth/api-keys";
import { verifyPassword } from "@/lib/auth/password";
import { createScratchDatabase } from "../support/db";

let scratch: Awaited<ReturnType<typeof createScratchDatabase>>;
let pool: pg.Pool;
const dir = mkdtempSync(path.join(tmpdir(), "slab-seed-"));

beforeAll(async () => {
  scratch = await createScratchDatabase();
  pool = createPool(scratch.url);
  await applyMigrations(pool);
  process.env.SLAB_CREDENTIALS_FILE = path.join(dir, "creds.json");
});
afterAll(async () => {
  await pool?.end();
  await scratch?.drop();
  rmSync(dir, { recursive: true, force: true });
});

const counts = async () =>
  (
    await pool.query(
      `select (select count(*) from users)::int as users, (select count(*) from memberships)::int as members,
              (select count(*) from parts)::int as parts, (select count(*) from kits)::int as kits,
              (select count(*) from kit_parts)::int as lines, (select count(*) from api_keys)::int as keys`,
    )
  ).rows[0];

describe("demo seed", () => {
  it("creates one user per role, two parts, a kit and a key with every scope", async () => {
    const creds = await seedDemo(scratch.url);
    expect(await counts()).toEqual({ users: 4, members: 4, parts: 2, kits: 1, lines: 2, keys: 1 });
    expect(creds.users.map((u) => u.role).sort()).toEqual(["designer", "operator", "owner", "viewer"]);
    const onDisk = JSON.parse(readFileSync(path.join(dir, "creds.json"), "utf8"));
    expect(onDisk).toEqual(creds);
    expect(parseApiKeyPrefix(creds.apiKey)).not.toBeNull();
    const key = await pool.query("select key_hash, scopes from api_keys");
    expect(key.rows[0].key_hash).toBe(hashApiKey(creds.apiKey));
    expect(key.rows[0].key_hash).not.toContain(creds.apiKey);
    expect(key.rows[0].scopes.sort()).toEqual(["kits:read", "plates:read", "plates:write", "templates:read"]);
    for (const u of DEMO_USERS) {
      const row = await pool.query("select password_hash from users where email = $1", [u.email]);
      expect(row.rows[0].password_hash).not.toBe(u.password);
      expect(await verifyPassword(u.password, row.rows[0].password_hash)).toBe(true);
    }
    const parts = await pool.query("select name, triangles, volume from parts order by name");
    for (const p of parts.rows) expect(p.volume).toBeGreaterThan(0);
  });

  it("is idempotent and keeps the same API key", async () => {
    const first = JSON.parse(readFileSync(path.join(dir, "creds.json"), "utf8"));
    const before = await counts();
    const again = await seedDemo(scratch.url);
    expect(await counts()).toEqual(before);
    expect(again.apiKey).toBe(first.apiKey);
  });
});
