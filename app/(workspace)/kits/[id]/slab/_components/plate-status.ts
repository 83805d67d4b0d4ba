import type { Plate } from "@/db/schema";

/**
 * Following a plate being made, without React: ask `/api/plates/{id}/status` until the job is done or
 * failed, the answer is lost, or the caller stops (an aborted signal: the editor was left). Stopping
 * cancels the request in flight and the pause between two questions.
 */
export type JobStatus = { status: Plate["jobState"]; progress: number; error: { message: string } | null };

export type WatchEnd =
  { kind: "done"; job: JobStatus } | { kind: "failed"; job: JobStatus } | { kind: "lost"; reason: string } | { kind: "stopped" };

export type WatchOptions = {
  signal: AbortSignal;
  /** Every answer, the last (done or failed) included. */
  onStatus: (job: JobStatus) => void;
  /** How long to wait between two questions (ms). */
  intervalMs?: number;
  fetch?: (url: string, init: { signal: AbortSignal }) => Promise<Response>;
};

const STATES = new Set<string>(["queued", "running", "done", "failed"] satisfies JobStatus["status"][]);

/** Wait `ms`, or less when the signal aborts. */
export function pause(ms: number, signal: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    if (signal.aborted) return resolve();
    const done = () => {
      clearTimeout(timer);
      signal.removeEventListener("abort", done);
      resolve();
    };
    const timer = setTimeout(done, ms);
    signal.addEventListener("abort", done, { once: true });
  });
}

export async function watchPlate(
  plateId: string,
  { signal, onStatus, intervalMs = 300, fetch: get = (url, init) => fetch(url, init) }: WatchOptions,
): Promise<WatchEnd> {
  const stopped = { kind: "stopped" } as const;
  const lost = (reason: string): WatchEnd => (signal.aborted ? stopped : { kind: "lost", reason });
  for (;;) {
    if (signal.aborted) return stopped;
    let res: Response;
    try {
      res = await get(`/api/plates/${encodeURIComponent(plateId)}/status`, { signal });
    } catch {
      return lost("the status check did not answer");
    }
    if (!res.ok) return lost(`status check answered HTTP ${res.status}`);
    let job: JobStatus | undefined;
    try {
      job = ((await res.json()) as { job?: JobStatus }).job;
    } catch {
      return lost("the status check's answer could not be read");
    }
    if (signal.aborted) return stopped;
    if (!job || !STATES.has(job.status)) return lost("the status check's answer could not be read");
    onStatus(job);
    if (job.status === "done") return { kind: "done", job };
    if (job.status === "failed") return { kind: "failed", job };
    await pause(intervalMs, signal);
  }
}
