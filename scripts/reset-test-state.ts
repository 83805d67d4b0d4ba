/**
 * Before a test run: clear counters and caught mail in the *test* database, so abuse limits from an
 * earlier run (invitations per hour, sign-in attempts) do not leak into this one.
 */
import { createPool } from "@/db/index";
import { env } from "@/lib/env";

const url = env().DATABASE_URL;
if (!/\/slabwright_test(\?|$)/.test(url)) {
  console.error(`refusing to reset a database that is not the test database: ${new URL(url).pathname}`);
  process.exit(1);
}
const pool = createPool(url);
await pool.query("truncate rate_limits, dev_outbox, plate_usage");
await pool.end();
