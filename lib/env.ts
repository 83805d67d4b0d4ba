import { z } from "zod";
import { databaseUrl } from "@/scripts/db-url.mjs";

/**
 * The environment, parsed once. Defaults make a plain checkout work: our own PostgreSQL on loopback
 * (scripts/pg.sh) and blobs on local disk under .data/.
 */
const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.string().url().default(databaseUrl()),
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
  STRIPE_SECRET_KEY: z.string().default("sk_test_local_fake"),
  STRIPE_WEBHOOK_SECRET: z.string().default("whsec_local_fake_secret"),
  STRIPE_API_BASE: z.string().url().optional(),
  STRIPE_PRICE_WORKSHOP: z.string().default("price_workshop_monthly"),
  STRIPE_PRICE_FARM: z.string().default("price_farm_monthly"),
  /** Days a workspace keeps its paid plan after a failed payment. */
  SLAB_BILLING_GRACE_DAYS: z.coerce.number().min(0).default(7),
});

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

export function env(): Env {
  if (!cached) {
    const parsed = schema.safeParse(process.env);
    if (!parsed.success) {
      const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n");
      throw new Error(`Invalid environment:\n${lines}`);
    }
    cached = parsed.data;
  }
  return cached;
}
