import { cpSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type pg from "pg";
import { createPool } from "@/db";
import { applyMigrations, MIGRATIONS_FOLDER } from "@/db/migrate";
import { createScratchDatabase } from "../support/db";

let scratch: Awaited<ReturnType<typeof createScratchDatabase>>;
let pool: pg.Pool;

beforeAll(async () => {
  scratch = await createScratchDatabase();
  pool = createPool(scratch.url);
});
afterAll(async () => {
  await pool?.end();
  await scratch?.drop();
});

const tables = async () =>
  (
    await pool.query<{ table_name: string }>("select table_name from information_schema.tables where table_schema = 'public' order by 1")
  ).rows.map((r) => r.table_name);

describe("migrations", () => {
  it("apply to an empty database and create every area's tables", async () => {
    expect(await tables()).toEqual([]);
    await applyMigrations(pool);
    const names = await tables();
    for (const t of [
      "users",
      "accounts",
      "sessions",
      "verification_tokens",
      "workspaces",
      "memberships",
      "api_keys",
      "parts",
      "kits",
      "kit_parts",
      "templates",
      "template_versions",
      "plates",
    ]) {
      expect(names).toContain(t);
    }
    const files = readdirSync(path.join(process.cwd(), "db", "migrations")).filter((f) => f.endsWith(".sql"));
    const applied = await pool.query("select count(*)::int as n from drizzle.__drizzle_migrations");
    expect(applied.rows[0].n).toBe(files.length);
  });

  it("re-run as a no-op", async () => {
    const before = await pool.query("select id, hash, created_at from drizzle.__drizzle_migrations order by id");
    const schemaBefore = await pool.query(
      "select table_name, column_name, data_type from information_schema.columns where table_schema = 'public' order by 1, 2",
    );
    await applyMigrations(pool);
    await applyMigrations(pool);
    const after = await pool.query("select id, hash, created_at from drizzle.__drizzle_migrations order by id");
    const schemaAfter = await pool.query(
      "select table_name, column_name, data_type from information_schema.columns where table_schema = 'public' order by 1, 2",
    );
    expect(after.rows).toEqual(before.rows);
    expect(schemaAfter.rows).toEqual(schemaBefore.rows);
  });

  it("keep a part used by a kit from being deleted, and cascade a workspace's records", async () => {
    const ws = await pool.query("insert into workspaces (id, name, slug) values ('w1', 'W', 'w') returning id");
    expect(ws.rowCount).toBe(1);
    await pool.query(
      "insert into parts (id, workspace_id, name, format, blob_key, byte_size, triangles, size_x, size_y, size_z, volume) values " +
        "('p1', 'w1', 'P', 'stl', $1, 1, 4, 1, 1, 1, 1)",
      ["0".repeat(64)],
    );
    await pool.query("insert into kits (id, workspace_id, name) values ('k1', 'w1', 'K')");
    await pool.query("insert into kit_parts (id, kit_id, part_id, quantity) values ('kp1', 'k1', 'p1', 2)");
    await expect(pool.query("delete from parts where id = 'p1'")).rejects.toThrow(/foreign key/);
    await expect(pool.query("insert into kit_parts (id, kit_id, part_id, quantity) values ('kp2', 'k1', 'p1', 0)")).rejects.toThrow(
      /check constraint/,
    );
    await pool.query("delete from kits where id = 'k1'");
    await pool.query("delete from workspaces where id = 'w1'");
    const left = await pool.query("select (select count(*) from parts)::int as parts, (select count(*) from kit_parts)::int as lines");
    expect(left.rows[0]).toEqual({ parts: 0, lines: 0 });
  });
});

describe("0014_template_names", () => {
  let before: Awaited<ReturnType<typeof createScratchDatabase>>;
  let beforePool: pg.Pool;
  let folder: string;
  beforeAll(async () => {
    before = await createScratchDatabase();
    beforePool = createPool(before.url);
    // Every migration before 0014, so the rows below are what a workspace may hold when it runs (drizzle
    // applies only migrations newer than the last one applied, so the later ones are left out too).
    folder = mkdtempSync(path.join(tmpdir(), "slab-migrations-"));
    cpSync(MIGRATIONS_FOLDER, folder, { recursive: true });
    const journalFile = path.join(folder, "meta", "_journal.json");
    const journal = JSON.parse(readFileSync(journalFile, "utf8")) as { entries: { tag: string }[] };
    const at = journal.entries.findIndex((e) => e.tag === "0014_template_names");
    journal.entries = journal.entries.slice(0, at);
    writeFileSync(journalFile, JSON.stringify(journal));
  });
  afterAll(async () => {
    await beforePool?.end();
    await before?.drop();
    if (folder) rmSync(folder, { recursive: true, force: true });
  });

  it("renames names that clash in a workspace (any case) oldest first, then refuses a new clash", async () => {
    await migrate(drizzle(beforePool), { migrationsFolder: folder });
    await beforePool.query("insert into workspaces (id, name, slug) values ('wa', 'A', 'a'), ('wb', 'B', 'b')");
    const rows: [string, string | null, string, string][] = [
      ["t1", "wa", "Thank-you card", "2026-01-01"],
      ["t2", "wa", "thank-you CARD", "2026-01-02"],
      ["t3", "wa", "Thank-you card", "2026-01-03"],
      // Already holds the name the second copy would get: that copy goes on to " (3)", this one to " (4)".
      ["t4", "wa", "Thank-you card (2)", "2025-12-01"],
      ["t5", "wb", "Thank-you card", "2026-01-04"], // another workspace: no clash
      ["t6", null, "Round thanks", "2026-01-01"], // starters keep their names, even twice
      ["t7", null, "Round thanks", "2026-01-02"],
    ];
    for (const [id, ws, name, at] of rows)
      await beforePool.query("insert into templates (id, workspace_id, name, created_at) values ($1, $2, $3, $4)", [id, ws, name, at]);

    await applyMigrations(beforePool);
    const names = await beforePool.query<{ id: string; name: string }>("select id, name from templates order by id");
    expect(Object.fromEntries(names.rows.map((r) => [r.id, r.name]))).toEqual({
      t1: "Thank-you card",
      t2: "thank-you CARD (3)",
      t3: "Thank-you card (4)",
      t4: "Thank-you card (2)",
      t5: "Thank-you card",
      t6: "Round thanks",
      t7: "Round thanks",
    });
    // PostgreSQL's unique_violation, SQLSTATE 23505, on the new index.
    await expect(
      beforePool.query("insert into templates (id, workspace_id, name) values ('t8', 'wa', 'THANK-YOU CARD')"),
    ).rejects.toMatchObject({ code: "23505", constraint: "templates_workspace_name_key" });
  });
});
