/**
 * `npm run outbox [N]`: the newest N (default 10) messages the demo's fake SMTP server caught, for
 * whoever runs the demo on this machine. In the app each person sees only their own mail.
 */
import pg from "pg";
import { databaseUrl } from "./db-url.mjs";

const n = Math.min(200, Math.max(1, Number(process.argv[2] ?? 10) || 10));
const client = new pg.Client({ connectionString: process.env.DATABASE_URL ?? databaseUrl() });
await client.connect();
const { rows } = await client.query<{ received_at: Date; to_addresses: string; subject: string | null; text: string | null }>(
  "select received_at, to_addresses, subject, text from dev_outbox order by received_at desc limit $1",
  [n],
);
await client.end();
if (rows.length === 0) console.log("No mail caught yet.");
for (const m of rows.reverse()) {
  console.log(`── ${m.received_at.toISOString()}  to ${m.to_addresses}\n   ${m.subject ?? "(no subject)"}\n\n${(m.text ?? "").trim()}\n`);
}
