import pg from "pg";
import { databaseUrl } from "@/scripts/db-url.mjs";

/**
 * The newest mail the fake SMTP server caught for `to` (read straight from the test database, as
 * whoever runs the demo can with `npm run outbox`), waiting up to `timeoutMs` for it to arrive.
 * `since` skips older mail; `subject` picks one kind of message.
 */
export async function mailTo(
  to: string,
  opts: { since?: Date; subject?: RegExp; timeoutMs?: number } = {},
): Promise<{ subject: string; text: string; links: string[] }> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL ?? databaseUrl() });
  await client.connect();
  try {
    const until = Date.now() + (opts.timeoutMs ?? 10_000);
    for (;;) {
      const { rows } = await client.query<{ subject: string | null; text: string | null }>(
        "select subject, text from dev_outbox where $1 = any(string_to_array(to_addresses, ', ')) and received_at >= $2 order by " +
          "received_at desc",
        [to.toLowerCase(), opts.since ?? new Date(0)],
      );
      const hit = rows.find((r) => !opts.subject || opts.subject.test(r.subject ?? ""));
      if (hit)
        return {
          subject: hit.subject ?? "",
          text: hit.text ?? "",
          links: [...(hit.text ?? "").matchAll(/https?:\/\/\S+/g)].map((m) => m[0]),
        };
      if (Date.now() > until)
        throw new Error(`no mail${opts.subject ? ` matching ${opts.subject}` : ""} reached the fake SMTP outbox for ${to}`);
      await new Promise((r) => setTimeout(r, 200));
    }
  } finally {
    await client.end();
  }
}

/** How many messages the fake SMTP server caught for `to` since `since`. */
export async function mailCount(to: string, since: Date): Promise<number> {
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL ?? databaseUrl() });
  await client.connect();
  try {
    const { rows } = await client.query<{ n: number }>(
      "select count(*)::int as n from dev_outbox where $1 = any(string_to_array(to_addresses, ', ')) and received_at >= $2",
      [to.toLowerCase(), since],
    );
    return rows[0]?.n ?? 0;
  } finally {
    await client.end();
  }
}
