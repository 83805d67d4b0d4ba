/**
 * A local fake SMTP server for development and tests: accepts every message on loopback and stores
 * it in PostgreSQL (dev_outbox), where the owner's outbox page shows it. Never run in a deployment.
 *   SLAB_SMTP_PORT (default 2525), DATABASE_URL.
 */
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";
import { createPool } from "@/db/index";
import { env } from "@/lib/env";
import { WORKSPACE_HEADER } from "@/lib/mail/headers";

const port = Number(process.env.SLAB_SMTP_PORT ?? 2525);
const pool = createPool(env().DATABASE_URL);

const server = new SMTPServer({
  authOptional: true,
  disabledCommands: ["STARTTLS"],
  size: 5 * 1024 * 1024,
  logger: false,
  onData(stream, _session, callback) {
    simpleParser(stream)
      .then(async (mail) => {
        // Bare addresses, lower case: the outbox matches them exactly against the viewer's own.
        const to = (Array.isArray(mail.to) ? mail.to : mail.to ? [mail.to] : [])
          .flatMap((a) => a.value.map((v) => (v.address ?? "").toLowerCase()))
          .filter(Boolean)
          .join(", ");
        const workspace = mail.headers.get(WORKSPACE_HEADER.toLowerCase());
        await pool.query(
          "insert into dev_outbox (id, from_address, to_addresses, subject, text, html, workspace_id) values ($1, $2, $3, $4, $5, $6, $7)",
          [
            crypto.randomUUID(),
            mail.from?.text ?? null,
            to,
            mail.subject ?? null,
            mail.text ?? null,
            typeof mail.html === "string" ? mail.html : null,
            typeof workspace === "string" ? workspace : null,
          ],
        );
        callback();
      })
      .catch((err: Error) => callback(err));
  },
});

server.on("error", (err: NodeJS.ErrnoException) => {
  if (err.code === "EADDRINUSE") {
    console.error(
      `fake SMTP: 127.0.0.1:${port} is taken (another copy running?); mail goes to whatever listens there. Set SLAB_SMTP_PORT to use ` +
        `another port.`,
    );
    process.exit(0);
  }
  console.error("fake SMTP:", err);
});
server.listen(port, "127.0.0.1", () => console.log(`fake SMTP listening on 127.0.0.1:${port}`));
const stop = () => {
  // Do not wait for idle SMTP sessions to time out.
  setTimeout(() => process.exit(0), 1500).unref();
  server.close(() => pool.end().then(() => process.exit(0)));
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
