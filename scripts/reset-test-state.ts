/**
 * Before a test run: clear counters and caught mail in the *test* database, so abuse limits and plan
 * usage from an earlier run (invitations per hour, sign-in attempts, plates made), and kits' saved slab settings,
 * do not leak into this one.
 */
import { createPool } from "@/db/index";
import { env } from "@/lib/env";

const url = env().DATABASE_URL;
if (!/\/slabwright_test(\?|$)/.test(url)) {
  console.error(`refusing to reset a database that is not the test database: ${new URL(url).pathname}`);
  process.exit(1);
}
const pool = createPool(url);
await pool.query("truncate abuse_counters, dev_outbox, plate_usage");
// The demo shop back on its given plan, without the keys earlier test runs made (plans limit keys).
await pool.query(
  `update workspace_billing set plan = 'workshop', status = 'active', customer_id = null, subscription_id = null, ` +
    `grace_until = null, period_start = null, period_end = null, last_event_at = null
  where workspace_id in (select id from workspaces where slug = 'marrowby')`,
);
await pool.query(
  `delete from api_keys where name <> 'Demo order system' and workspace_id in (select id from workspaces where slug = 'marrowby')`,
);
// Every kit opens the slab editor on its defaults again: a spec that changes a kit's slab does not change the next run's start.
await pool.query("update kits set slab_settings = null where slab_settings is not null");
await pool.end();
