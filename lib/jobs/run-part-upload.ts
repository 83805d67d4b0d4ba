import { and, eq } from "drizzle-orm";
import type { Piscina } from "piscina";
import { db } from "@/db";
import { partUploads, parts } from "@/db/schema";
import type { Unit } from "@/lib/geometry/io/raw";
import type { PartUploadTask } from "@/lib/parts/measure";
import { dropOrphans } from "@/lib/parts/orphans";
import type { PartUploadOutcome } from "./build-thread";

/**
 * Import one uploaded file in a pool thread, then add its part(s) and mark the upload `ready` in one
 * transaction, or record the importer's refusal (`refused`) and drop the stored bytes. Anything
 * unexpected is thrown so the queue retries the job.
 */
export async function runPartUploadJob(pool: Piscina, uploadId: string): Promise<void> {
  const [u] = await db().select().from(partUploads).where(eq(partUploads.id, uploadId));
  if (!u || u.state !== "checking") return; // finished by an earlier delivery of this job
  const task: PartUploadTask = { blobKey: u.blobKey, fileName: u.fileName, split: u.options.split, unit: u.options.unit as Unit | undefined, layFlat: u.options.layFlat };
  const outcome = (await pool.run(task, { name: "importPart" })) as PartUploadOutcome;
  if (!outcome.ok) {
    await db().update(partUploads).set({ state: "refused", error: { code: outcome.code, message: outcome.message, details: { file: u.fileName, ...outcome.details } }, finishedAt: new Date() }).where(and(eq(partUploads.id, uploadId), eq(partUploads.state, "checking")));
    await dropOrphans([u.blobKey]);
    return;
  }
  try {
    await db().transaction(async (tx) => {
      const rows = await tx
        .insert(parts)
        .values(outcome.drafts.map((d) => ({ ...d, workspaceId: u.workspaceId, uploadedBy: u.uploadedBy })))
        .returning({ id: parts.id });
      await tx.update(partUploads).set({ state: "ready", partIds: rows.map((r) => r.id), finishedAt: new Date() }).where(eq(partUploads.id, uploadId));
    });
  } catch (err) {
    await dropOrphans(outcome.blobs);
    throw err;
  }
  // A split upload is stored as its bodies' own files: the original bytes serve nothing now.
  if (outcome.drafts.every((d) => d.blobKey !== u.blobKey)) await dropOrphans([u.blobKey]);
}
