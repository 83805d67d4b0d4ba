import { applyMigrations } from "@/db/migrate";
import { createPool } from "@/db/index";
import { env } from "@/lib/env";

const pool = createPool(env().DATABASE_URL);
try {
  const started = Date.now();
  await applyMigrations(pool);
  console.log(`migrations: up to date (${Date.now() - started} ms)`);
} catch (err) {
  console.error("migrations failed:", err);
  process.exitCode = 1;
} finally {
  await pool.end();
}
