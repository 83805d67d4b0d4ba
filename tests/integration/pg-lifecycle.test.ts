import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { createPool } from "@/db";
import { checkHealth } from "@/lib/health";

// A second, throw-away cluster driven by our own scripts/pg.sh, so stopping it does not disturb the
// test database the other tests use.
const base = mkdtempSync(path.join(tmpdir(), "slab-pgtest-"));
const dir = path.join(base, "pg");
const port = 55000 + Math.floor(Math.random() * 4000);
const env = { ...process.env, SLAB_PG_DIR: dir, SLAB_PG_PORT: String(port), SLAB_PG_FAST: "1" };
const pg = (cmd: string) => spawnSync("bash", ["scripts/pg.sh", cmd], { env, encoding: "utf8" });
const url = `postgres://postgres@127.0.0.1:${port}/postgres`;

afterAll(() => {
  pg("stop");
  rmSync(base, { recursive: true, force: true });
});

async function health() {
  const pool = createPool(url);
  try {
    return await checkHealth(pool, 1500);
  } finally {
    await pool.end();
  }
}

describe("our PostgreSQL lifecycle (scripts/pg.sh) and the health check", () => {
  it("creates a cluster on first start, and health says ok", async () => {
    const start = pg("start");
    expect(start.status, start.stderr).toBe(0);
    expect(start.stderr).toContain("creating a new cluster");
    expect(pg("status").status).toBe(0);
    const h = await health();
    expect(h.httpStatus).toBe(200);
    expect(h.body).toMatchObject({ status: "ok", db: "ok" });
  });

  it("is safe to start again while running", () => {
    const again = pg("start");
    expect(again.status).toBe(0);
    expect(again.stderr).toContain("already running");
  });

  it("stops cleanly, and health answers 503 with db down", async () => {
    expect(pg("stop").status).toBe(0);
    expect(pg("status").status).toBe(3);
    const started = Date.now();
    const h = await health();
    expect(h.httpStatus).toBe(503);
    expect(h.body).toMatchObject({ status: "degraded", db: "down" });
    expect(Date.now() - started).toBeLessThan(5000);
  });

  it("recovers from a crash that left a stale pid file", async () => {
    expect(pg("start").status).toBe(0);
    const pid = Number(readFileSync(path.join(dir, "postmaster.pid"), "utf8").split("\n")[0]);
    process.kill(pid, "SIGKILL");
    await new Promise((r) => setTimeout(r, 300));
    expect(pg("status").status).toBe(3);
    const restart = pg("start");
    expect(restart.status, restart.stderr).toBe(0);
    expect(restart.stderr).toContain("stale postmaster.pid");
    expect((await health()).httpStatus).toBe(200);
  });
});
