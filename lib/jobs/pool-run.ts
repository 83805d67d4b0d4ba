import type { Piscina } from "piscina";

/**
 * A task on the build pool, given once more when the thread it went to was ending itself: a build
 * thread retires after its quota of builds (process.exit(0), see build-thread.ts), and a task piscina
 * handed it in that moment is rejected with "worker exited with code: 0" though nothing went wrong.
 * Any other failure (a crash exits with another code) is the caller's, as before.
 */
export async function runOnPool<T>(pool: Piscina, task: unknown, options?: { name?: string }): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return (await pool.run(task, options)) as T;
    } catch (err) {
      if (attempt >= 3 || !retired(err)) throw err;
    }
  }
}

export function retired(err: unknown): boolean {
  return err instanceof Error && /worker exited with code: 0\b/i.test(err.message);
}
