import "server-only";
import pg from "pg";
import type { Plate } from "@/db/schema";
import { plateById } from "@/db/queries/plates";
import type { WorkspaceActor } from "@/lib/auth/actor";
import { env } from "@/lib/env";
import { PLATE_CHANNEL } from "@/lib/jobs/queue";

const gw = globalThis as unknown as { __slabPlateListener?: Promise<Map<string, Set<() => void>>> };

/** One LISTEN connection per app process; a worker's NOTIFY wakes the requests waiting for that plate. */
function plateListener(): Promise<Map<string, Set<() => void>>> {
  gw.__slabPlateListener ??= (async () => {
    const waiters = new Map<string, Set<() => void>>();
    const client = new pg.Client({ connectionString: env().DATABASE_URL });
    client.on("notification", (n) => {
      for (const f of waiters.get(n.payload ?? "") ?? []) f();
    });
    client.on("error", (err) => {
      console.error("[plates] listener lost", err);
      gw.__slabPlateListener = undefined;
    });
    await client.connect();
    await client.query(`listen ${PLATE_CHANNEL}`);
    return waiters;
  })();
  return gw.__slabPlateListener;
}

/** Wait for a plate's build to end, up to `ms` (woken by the worker's NOTIFY, checked every second anyway). */
export async function waitForPlate(actor: WorkspaceActor, id: string, ms: number): Promise<Plate> {
  const until = Date.now() + ms;
  const waiters = await plateListener().catch(() => null);
  for (;;) {
    const p = await plateById(actor, id);
    if (p.jobState === "done" || p.jobState === "failed" || Date.now() >= until) return p;
    await new Promise<void>((resolve) => {
      const set = waiters?.get(id) ?? new Set();
      waiters?.set(id, set);
      const done = () => {
        set.delete(done);
        if (set.size === 0) waiters?.delete(id);
        clearTimeout(timer);
        resolve();
      };
      const timer = setTimeout(done, Math.min(1000, Math.max(1, until - Date.now())));
      set.add(done);
    });
  }
}
