import PgBoss from "pg-boss";
import { env } from "@/lib/env";

/** The build queue lives in PostgreSQL (pg-boss): any number of worker processes on any machine share it. */
export const BUILD_QUEUE = "plate-build";

/**
 * A job not finished within this many seconds is taken to be lost with its worker and is handed to
 * another (short on purpose: a dead worker costs seconds, not hours). Builds take about a second.
 */
export function jobExpirySeconds(): number {
  return Number(process.env.SLAB_JOB_EXPIRY_S ?? 60);
}

const g = globalThis as unknown as { __slabBoss?: Promise<PgBoss> };

export function boss(): Promise<PgBoss> {
  g.__slabBoss ??= (async () => {
    const b = new PgBoss({ connectionString: env().DATABASE_URL, max: 4 });
    b.on("error", (err) => console.error("[queue]", err));
    await b.start();
    await b.createQueue(BUILD_QUEUE, { name: BUILD_QUEUE, retryLimit: 3, retryDelay: 1, expireInSeconds: jobExpirySeconds() });
    return b;
  })();
  return g.__slabBoss;
}

export async function enqueueBuild(plateId: string): Promise<string> {
  const id = await (await boss()).send(BUILD_QUEUE, { plateId }, { retryLimit: 3, retryDelay: 1, expireInSeconds: jobExpirySeconds() });
  if (!id) throw new Error("the queue did not accept the build");
  return id;
}
