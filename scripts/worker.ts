/**
 * The build worker: takes plate jobs from the PostgreSQL queue and builds them in a pool of worker
 * threads, one per core by default (SLAB_WORKER_THREADS). Run more of these on other machines with the
 * same DATABASE_URL (and the same blob storage) to share the work.
 *
 * Each job slot (two per thread) runs its own fetch loop: it wakes at once on a NOTIFY from the app when a job is
 * queued, and otherwise polls once a second (a job handed out again after a crash has no NOTIFY).
 */
import os from "node:os";
import pg from "pg";
import { Piscina } from "piscina";
import { env } from "@/lib/env";
import { eq } from "drizzle-orm";
import { db } from "@/db";
import { templateVersions } from "@/db/schema";
import { BUILD_QUEUE, boss, enqueueThumbnail, JOB_CHANNEL } from "@/lib/jobs/queue";
import { runPartUploadJob } from "@/lib/jobs/run-part-upload";
import { runPlateJob } from "@/lib/jobs/run-job";
import { runThumbnailJob } from "@/lib/jobs/run-thumbnail";

const threads = Number(process.env.SLAB_WORKER_THREADS ?? Math.max(1, os.availableParallelism()));
const pool = new Piscina({ filename: new URL("../lib/jobs/build-thread-entry.mjs", import.meta.url).href, minThreads: threads, maxThreads: threads, idleTimeout: 60_000 });
const queue = await boss();

let wake: (() => void)[] = [];
const nudge = () => {
  const w = wake;
  wake = [];
  for (const f of w) f();
};
const listener = new pg.Client({ connectionString: env().DATABASE_URL });
await listener.connect();
listener.on("notification", nudge);
await listener.query(`listen ${JOB_CHANNEL}`);

let stopping = false;
async function slot() {
  while (!stopping) {
    const [job] = await queue.fetch<{ plateId?: string; templateVersionId?: string; partUploadId?: string }>(BUILD_QUEUE, { batchSize: 1 }).catch((err: unknown) => {
      console.error("[worker] fetch failed", err);
      return [];
    });
    if (!job) {
      await new Promise<void>((resolve) => {
        wake.push(resolve);
        setTimeout(resolve, 1000);
      });
      continue;
    }
    try {
      if (job.data.partUploadId) await runPartUploadJob(pool, job.data.partUploadId);
      else if (job.data.templateVersionId) await runThumbnailJob(pool, job.data.templateVersionId);
      else await runPlateJob(pool, job.data.plateId!, job.id);
      await queue.complete(BUILD_QUEUE, job.id);
    } catch (err) {
      console.error(`[worker] job ${job.id} failed`, err);
      await queue.fail(BUILD_QUEUE, job.id, { message: err instanceof Error ? err.message : String(err) }).catch(() => undefined);
    }
  }
}
// Two jobs in hand per thread: while one job's files are stored and its row is written, the thread
// already builds the next (piscina queues it), so a thread never idles on the database or the disk.
const perThread = Math.max(1, Number(process.env.SLAB_JOBS_PER_THREAD ?? 2));
const slots = Array.from({ length: threads * perThread }, () => slot());
// Template top views still to draw (seeded starters, or a queue that was down when one was saved).
void (async () => {
  const pending = await db().select({ id: templateVersions.id }).from(templateVersions).where(eq(templateVersions.thumbnailState, "pending"));
  for (const v of pending) await enqueueThumbnail(v.id).catch((err: unknown) => console.error("[worker] thumbnail not queued", err));
})();
console.log(`worker: ${threads} build ${threads === 1 ? "thread" : "threads"} on queue ${BUILD_QUEUE}`);

async function stop() {
  if (stopping) return;
  stopping = true;
  nudge();
  await Promise.race([Promise.all(slots), new Promise((r) => setTimeout(r, 10_000))]);
  await listener.end().catch(() => undefined);
  await queue.stop({ graceful: true, timeout: 5_000 }).catch(() => undefined);
  await pool.destroy();
  process.exit(0);
}
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
