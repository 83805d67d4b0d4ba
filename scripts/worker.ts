/**
 * The build worker: takes plate jobs from the PostgreSQL queue and builds them in a pool of worker
 * threads, one per core by default (SLAB_WORKER_THREADS). Run more of these on other machines with the
 * same DATABASE_URL (and the same blob storage) to share the work.
 *
 * Each job slot (two per thread) runs its own fetch loop: it wakes at once on a NOTIFY from the app when a job is
 * queued, and otherwise polls once a second (a job handed out again after a crash has no NOTIFY).
 *
 * Webhook deliveries have their own queue and their own slots (SLAB_CALLBACK_CONCURRENCY, I/O only,
 * on the main thread): a receiver that never answers holds one delivery slot for one attempt's
 * timeout, never a build thread.
 */
import os from "node:os";
import pg from "pg";
import { Piscina } from "piscina";
import { env } from "@/lib/env";
import { pendingThumbnails } from "@/db/queries/templates";
import { BUILD_QUEUE, boss, CALLBACK_QUEUE, callbackTimeoutMs, enqueueThumbnail, JOB_CHANNEL } from "@/lib/jobs/queue";
import { runPartUploadJob } from "@/lib/jobs/run-part-upload";
import { runPlateJob } from "@/lib/jobs/run-job";
import { runThumbnailJob } from "@/lib/jobs/run-thumbnail";
import { deliverOnce, type CallbackJob } from "@/lib/jobs/webhook";

const threads = env().SLAB_WORKER_THREADS ?? Math.max(1, os.availableParallelism());
const pool = new Piscina({
  filename: new URL("../lib/jobs/build-thread-entry.mjs", import.meta.url).href,
  minThreads: threads,
  maxThreads: threads,
  idleTimeout: 60_000,
});
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
/** One fetch loop on a queue: a job at a time; a thrown error fails the job, and pg-boss retries it on its schedule. */
async function loop<T extends object>(name: string, run: (job: { id: string; data: T }) => Promise<object | void>) {
  while (!stopping) {
    const [job] = await queue.fetch<T>(name, { batchSize: 1 }).catch((err: unknown) => {
      console.error(`[worker] fetch from ${name} failed`, err);
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
      const output = await run(job);
      await queue.complete(name, job.id, output ?? {});
    } catch (err) {
      console.error(`[worker] ${name} job ${job.id} failed`, err instanceof Error ? err.message : err);
      await queue.fail(name, job.id, { message: err instanceof Error ? err.message : String(err) }).catch(() => undefined);
    }
  }
}

const slot = () =>
  loop<{ plateId?: string; templateVersionId?: string; partUploadId?: string }>(BUILD_QUEUE, async (job) => {
    if (job.data.partUploadId) await runPartUploadJob(pool, job.data.partUploadId);
    else if (job.data.templateVersionId) await runThumbnailJob(pool, job.data.templateVersionId);
    else if (job.data.plateId) await runPlateJob(pool, job.data.plateId, job.id);
    else throw new Error("a build job without a plate or a template version");
  });

const callbackSlot = () =>
  loop<CallbackJob>(CALLBACK_QUEUE, async (job) => {
    const out = await deliverOnce(job.data, { timeoutMs: callbackTimeoutMs() });
    // A refused address stays refused: finish the job without retrying (the reason is kept as its output).
    if (!out.delivered && "refused" in out) {
      console.warn(`[worker] callback ${job.id} not sent: ${out.refused.message}`);
      return { refused: out.refused.reason };
    }
    if (!out.delivered) throw new Error(`callback not delivered: ${out.error}`);
    return { status: out.status };
  });
// Two jobs in hand per thread: while one job's files are stored and its row is written, the thread
// already builds the next (piscina queues it), so a thread never idles on the database or the disk.
const perThread = env().SLAB_JOBS_PER_THREAD;
const callbackSlots = env().SLAB_CALLBACK_CONCURRENCY;
const slots = [
  ...Array.from({ length: threads * perThread }, () => slot()),
  ...Array.from({ length: callbackSlots }, () => callbackSlot()),
];
// Template top views still to draw (seeded starters, or a queue that was down when one was saved).
void (async () => {
  const pending = await pendingThumbnails();
  for (const v of pending) await enqueueThumbnail(v.id).catch((err: unknown) => console.error("[worker] thumbnail not queued", err));
})();
console.log(
  `worker: ${threads} build ${threads === 1 ? "thread" : "threads"} on queue ${BUILD_QUEUE}, ${callbackSlots} delivery slots on ` +
    `${CALLBACK_QUEUE}`,
);

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
