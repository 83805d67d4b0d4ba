import PgBoss from "pg-boss";
import { pool } from "@/db/index";
import { env } from "@/lib/env";

/** The build queue lives in PostgreSQL (pg-boss): any number of worker processes on any machine share it. */
export const BUILD_QUEUE = "plate-build";
/** NOTIFY channel that wakes idle workers when a job is queued. */
export const JOB_CHANNEL = "slab_jobs";
/** Webhook deliveries: their own queue, so a slow receiver holds a delivery slot, never a build. */
export const CALLBACK_QUEUE = "plate-callback";
/** NOTIFY channel on which a worker says a plate's build ended (payload: the plate id). */
export const PLATE_CHANNEL = "slab_plates";

/**
 * A job not finished within this many seconds is taken to be lost with its worker and is handed to
 * another (short on purpose: a dead worker costs seconds, not hours). Builds take about a second.
 */
export function jobExpirySeconds(): number {
  return env().SLAB_JOB_EXPIRY_S;
}

/** How often the queue looks for expired jobs (those whose worker died) to hand them out again. */
const g = globalThis as unknown as { __slabBoss?: Promise<PgBoss> };

export function boss(): Promise<PgBoss> {
  g.__slabBoss ??= (async () => {
    const b = new PgBoss({ connectionString: env().DATABASE_URL, max: 4, maintenanceIntervalSeconds: env().SLAB_QUEUE_MAINTENANCE_S });
    b.on("error", (err) => console.error("[queue]", err));
    await b.start();
    await b.createQueue(BUILD_QUEUE, { name: BUILD_QUEUE, retryLimit: 3, retryDelay: 1, expireInSeconds: jobExpirySeconds() });
    await b.createQueue(CALLBACK_QUEUE, { name: CALLBACK_QUEUE, ...callbackRetry() });
    return b;
  })();
  return g.__slabBoss;
}

/** Queue a plate's build; a higher `priority` (the Farm plan's) is fetched first when workers are busy. */
export async function enqueueBuild(plateId: string, priority = 0): Promise<string> {
  const id = await (
    await boss()
  ).send(BUILD_QUEUE, { plateId }, { retryLimit: 3, retryDelay: 1, expireInSeconds: jobExpirySeconds(), priority });
  if (!id) throw new Error("the queue did not accept the build");
  await pool().query(`select pg_notify('${JOB_CHANNEL}', $1)`, [id]);
  return id;
}

/** A template version's top view is drawn by a worker too (the app never runs the kernel). */
export async function enqueueThumbnail(templateVersionId: string): Promise<string> {
  const id = await (
    await boss()
  ).send(BUILD_QUEUE, { templateVersionId }, { retryLimit: 2, retryDelay: 1, expireInSeconds: jobExpirySeconds() });
  if (!id) throw new Error("the queue did not accept the thumbnail");
  await pool().query(`select pg_notify('${JOB_CHANNEL}', $1)`, [id]);
  return id;
}

/**
 * A delivery's schedule: 1 + `retryLimit` attempts, each given `timeoutMs`; pg-boss's backoff waits
 * retryDelay·2^n·(1..2) seconds before retry n+1 (5–10 s, 10–20 s, … about 2.5–5 min in all). A job
 * longer than expireInSeconds is taken as lost with its worker and handed out again.
 */
export function callbackRetry(): { retryLimit: number; retryDelay: number; retryBackoff: true; expireInSeconds: number } {
  const timeoutS = Math.ceil(callbackTimeoutMs() / 1000);
  return {
    retryLimit: env().SLAB_CALLBACK_RETRY_LIMIT,
    retryDelay: env().SLAB_CALLBACK_RETRY_DELAY_S,
    retryBackoff: true,
    expireInSeconds: Math.max(30, 3 * timeoutS),
  };
}

/** How long one delivery attempt may take (connect, send, status line) before it counts as failed. */
export function callbackTimeoutMs(): number {
  return env().SLAB_CALLBACK_TIMEOUT_MS;
}

/** Queue a signed webhook event; the worker delivers it (and retries it) from CALLBACK_QUEUE. */
export async function enqueueCallback(workspaceId: string, url: string, event: Record<string, unknown>): Promise<string> {
  const id = await (await boss()).send(CALLBACK_QUEUE, { workspaceId, url, body: JSON.stringify(event) }, callbackRetry());
  if (!id) throw new Error("the queue did not accept the callback");
  await pool().query(`select pg_notify('${JOB_CHANNEL}', $1)`, [id]);
  return id;
}

/** An uploaded part file is imported by a worker too (the web process never parses a mesh). */
export async function enqueuePartUpload(partUploadId: string): Promise<string> {
  const id = await (
    await boss()
  ).send(BUILD_QUEUE, { partUploadId }, { retryLimit: 2, retryDelay: 1, expireInSeconds: jobExpirySeconds() });
  if (!id) throw new Error("the queue did not accept the upload");
  await pool().query(`select pg_notify('${JOB_CHANNEL}', $1)`, [id]);
  return id;
}
