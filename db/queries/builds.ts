import { and, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { plateFiles, plates, type Plate } from "@/db/schema";
import type { ExportFormatId } from "@/lib/geometry/formats";
import type { WorkspaceActor } from "@/lib/auth/actor";

/**
 * A plate's build, as the worker records it: the plate the job names, then its progress and outcome
 * within the plate's workspace (the worker acts as the system for it). No server-only import: the
 * worker process runs these.
 */

/** The plate a build job names (the job carries the plate's id alone; its workspace comes from the row). */
export async function plateForBuild(plateId: string): Promise<Plate | null> {
  const [plate] = await db().select().from(plates).where(eq(plates.id, plateId));
  return plate ?? null;
}

/** The build has started in job `jobId`. */
export async function startBuild(actor: WorkspaceActor, plateId: string, jobId: string): Promise<void> {
  await db()
    .update(plates)
    .set({ jobState: "running", progress: 0.2, jobId })
    .where(and(eq(plates.id, plateId), eq(plates.workspaceId, actor.workspaceId)));
}

export async function setBuildProgress(actor: WorkspaceActor, plateId: string, progress: number): Promise<void> {
  await db()
    .update(plates)
    .set({ progress })
    .where(and(eq(plates.id, plateId), eq(plates.workspaceId, actor.workspaceId)));
}

/** The build's outcome on the plate (its files, findings, proof or error), finished at `finishedAt`. */
export async function finishBuild(
  actor: WorkspaceActor,
  plateId: string,
  set: Partial<typeof plates.$inferInsert>,
  finishedAt: Date,
  files: { format: ExportFormatId; blobKey: string; bytes: number; sha256: string }[] = [],
): Promise<void> {
  // The outcome and the files land together: a ready plate always has its files listed.
  await db().transaction(async (tx) => {
    const [row] = await tx
      .update(plates)
      .set({ ...set, progress: 1, finishedAt })
      .where(and(eq(plates.id, plateId), eq(plates.workspaceId, actor.workspaceId)))
      .returning({ id: plates.id });
    if (!row || !files.length) return;
    await tx
      .insert(plateFiles)
      .values(files.map((f) => ({ plateId, ...f })))
      .onConflictDoUpdate({
        target: [plateFiles.plateId, plateFiles.format],
        set: { blobKey: sql`excluded.blob_key`, bytes: sql`excluded.bytes`, sha256: sql`excluded.sha256` },
      });
  });
}

/** Tell whoever listens on `channel` (a request waiting for the plate) that the plate has changed. */
export async function announcePlate(channel: string, plateId: string): Promise<void> {
  await db().execute(sql`select pg_notify(${channel}, ${plateId})`);
}
