import { z } from "zod";
import { databaseUrl } from "@/scripts/db-url.mjs";

/**
 * The environment, parsed once. Defaults make a plain checkout work: our own PostgreSQL on loopback
 * (scripts/pg.sh) and blobs on local disk under .data/.
 *
 * No secret has a default here (AUTH_SECRET, STRIPE_SECRET_KEY, STRIPE_WEBHOOK_SECRET, the database
 * password): `npm start` and `npm test` make random ones once per installation under .data/
 * (scripts/setup.mjs, scripts/pg.sh) and pass them in; a deployment sets its own. Production refuses
 * to start without the two the app cannot run safely without (requireStartupSecrets, instrumentation.ts).
 */

/** Values that were once written in this repository's source: known to anyone, so never accepted. */
const PUBLISHED = new Set(["whsec_local_fake_secret", "sk_test_local_fake"]);

/** An optional secret: an empty value counts as unset; a value once published in the source is refused. */
const secret = (name: string, min = 1) =>
  z.preprocess(
    (v) => (v === "" ? undefined : v),
    z
      .string()
      .min(min, `${name} must be at least ${min} characters`)
      .refine((v) => !PUBLISHED.has(v), `${name} is a value that was once published in the source code: make a new one`)
      .optional(),
  );

const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.string().url().default(databaseUrl()),
  /** Signs session tokens (Auth.js reads it itself); checked here so production cannot start without it. */
  AUTH_SECRET: secret("AUTH_SECRET", 32),
  /** Where links in e-mails point. */
  AUTH_URL: z.string().url().default("http://localhost:3000"),
  /** Outgoing mail. In development and tests this is our fake SMTP server on loopback. */
  SMTP_URL: z.string().default("smtp://127.0.0.1:2525"),
  MAIL_FROM: z.string().default("Slabwright <no-reply@slabwright.example>"),
  /** "1" when the local fake SMTP server catches mail (development, tests): enables the outbox page. */
  SLAB_FAKE_SMTP: z.enum(["0", "1"]).default("0"),
  STORAGE_DRIVER: z.enum(["disk", "s3"]).default("disk"),
  STORAGE_DIR: z.string().default(".data/blobs"),
  S3_ENDPOINT: z.string().url().optional(),
  S3_REGION: z.string().default("us-east-1"),
  S3_BUCKET: z.string().optional(),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  /** Payments (the stripe SDK). In development and tests STRIPE_API_BASE points it at our local fake. */
  STRIPE_SECRET_KEY: secret("STRIPE_SECRET_KEY"),
  /** Verifies the payment provider's webhook events. */
  STRIPE_WEBHOOK_SECRET: secret("STRIPE_WEBHOOK_SECRET"),
  STRIPE_API_BASE: z.string().url().optional(),
  STRIPE_PRICE_WORKSHOP: z.string().default("price_workshop_monthly"),
  STRIPE_PRICE_FARM: z.string().default("price_farm_monthly"),
  /** Days a workspace keeps its paid plan after a failed payment. */
  SLAB_BILLING_GRACE_DAYS: z.coerce.number().min(0).default(7),
  /** Largest upload accepted, bytes (library files and the plate API's whole body); default 200 MB. */
  SLAB_MAX_UPLOAD_BYTES: z.coerce
    .number()
    .int()
    .min(1024)
    .max(2 ** 31)
    .default(200 * 1024 * 1024),
  /** How long `POST /api/v1/plates` waits for the build before answering 202 with the job. */
  SLAB_SYNC_WAIT_MS: z.coerce.number().int().min(0).max(120_000).default(20_000),
  /** A build job not finished in this time is retried by the queue. */
  SLAB_JOB_EXPIRY_S: z.coerce.number().int().min(5).max(3600).default(60),
  /** How often the queue looks for expired jobs. */
  SLAB_QUEUE_MAINTENANCE_S: z.coerce.number().int().min(1).max(3600).default(15),
  /** Callback deliveries: tries after the first, seconds before the first retry (doubling), time per attempt. */
  SLAB_CALLBACK_RETRY_LIMIT: z.coerce.number().int().min(0).max(20).default(5),
  SLAB_CALLBACK_RETRY_DELAY_S: z.coerce.number().int().min(0).max(3600).default(5),
  SLAB_CALLBACK_TIMEOUT_MS: z.coerce.number().int().min(100).max(120_000).default(10_000),
  /** Hosts callbacks may reach though not public (test receivers on loopback); ignored in production unless the next is "1". */
  SLAB_WEBHOOK_ALLOW_HOSTS: z.string().default(""),
  SLAB_WEBHOOK_ALLOW_HOSTS_IN_PRODUCTION: z.string().optional(),
  /** Build threads' scheduling priority (Unix nice, 0–19): builds yield the cores to the web process. */
  SLAB_THREAD_NICE: z.coerce.number().int().min(0).max(19).default(19),
  /** Builds one thread makes before it is replaced (bounds what a leak could cost). */
  SLAB_THREAD_MAX_BUILDS: z.coerce.number().int().min(1).max(1_000_000).default(100),
  /** The worker process: build threads (default: one per core), jobs each holds at once, callback deliveries at once. */
  SLAB_WORKER_THREADS: z.coerce.number().int().min(1).max(256).optional(),
  SLAB_JOBS_PER_THREAD: z.coerce.number().int().min(1).max(16).default(2),
  SLAB_CALLBACK_CONCURRENCY: z.coerce.number().int().min(1).max(256).default(8),
  /** Where the seed writes the demo accounts' passwords and API key. */
  SLAB_CREDENTIALS_FILE: z.string().optional(),
});

export type Env = z.infer<typeof schema>;
type SecretName = "AUTH_SECRET" | "STRIPE_SECRET_KEY" | "STRIPE_WEBHOOK_SECRET";

/** Parse an environment (process.env, or a test's own); throws one message listing every problem. */
export function parseEnv(source: Record<string, string | undefined>): Env {
  const parsed = schema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n");
    throw new Error(`Invalid environment:\n${lines}`);
  }
  return parsed.data;
}

/** The secrets production cannot run without: checked once when the server starts. */
const STARTUP_SECRETS: SecretName[] = ["AUTH_SECRET", "STRIPE_WEBHOOK_SECRET"];

export function requireStartupSecrets(e: Env): void {
  if (e.NODE_ENV !== "production") return;
  const missing = STARTUP_SECRETS.filter((n) => !e[n]);
  if (missing.length === 0) return;
  throw new Error(
    `Slabwright will not start in production without ${missing.join(" and ")}. Set ${missing.length > 1 ? "them" : "it"} in the ` +
      `environment ` +
      "(AUTH_SECRET: 32 or more random characters; STRIPE_WEBHOOK_SECRET: the signing secret of the payment provider's webhook " +
      "endpoint). " +
      "npm start and npm test make local ones under .data/ by themselves.",
  );
}

/** A secret a feature needs right now: its value, or an error that names it. */
export function requireSecret(name: SecretName): string {
  const v = env()[name];
  if (!v) throw new Error(`${name} is not set: npm start and npm test make it under .data/; a deployment must set it`);
  return v;
}

let cached: Env | undefined;

export function env(): Env {
  cached ??= parseEnv(process.env);
  return cached;
}

/** At server start (instrumentation.ts): print why and exit when production lacks its secrets. */
export function exitWithoutStartupSecrets(): void {
  try {
    requireStartupSecrets(env());
  } catch (err) {
    console.error(`✕ ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  }
}
