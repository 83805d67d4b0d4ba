/**
 * The build worker: takes plate jobs from the PostgreSQL queue and builds them in a pool of worker
 * threads, one per core by default (SLAB_WORKER_THREADS). Run more of these on other machines with the
 * same DATABASE_URL (and the same blob storage) to share the work.
 */
import os from "node:os";
import { Piscina } from "piscina";
import { BUILD_QUEUE, boss } from "@/lib/jobs/queue";
import { runPlateJob } from "@/lib/jobs/run-job";

const threads = Number(process.env.SLAB_WORKER_THREADS ?? Math.max(1, os.availableParallelism()));
const pool = new Piscina({ filename: new URL("../lib/jobs/build-thread-entry.mjs", import.meta.url).href, minThreads: threads, maxThreads: threads, idleTimeout: 60_000 });
const queue = await boss();

// One subscription per thread, each taking one job at a time: a failing job fails alone.
for (let i = 0; i < threads; i++) {
  await queue.work<{ plateId: string }>(BUILD_QUEUE, { batchSize: 1, pollingIntervalSeconds: 0.5 }, async ([job]) => {
    if (job) await runPlateJob(pool, job.data.plateId, job.id);
  });
}
console.log(`worker: ${threads} build ${threads === 1 ? "thread" : "threads"} on queue ${BUILD_QUEUE}`);

let stopping = false;
async function stop() {
  if (stopping) return;
  stopping = true;
  await queue.stop({ graceful: true, timeout: 10_000 }).catch(() => undefined);
  await pool.destroy();
  process.exit(0);
}
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
