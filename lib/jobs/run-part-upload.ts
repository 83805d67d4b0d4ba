import { and, eq } from "drizzle-orm";
import type { Piscina } from "piscina";
import { db } from "@/db";
import { partUploads, parts, type PartUpload } from "@/db/schema";
import type { Unit } from "@/lib/geometry/io/raw";
import { inKitsRefusal } from "@/lib/parts/in-kits";
import type { PartDraft, PartUploadTask } from "@/lib/parts/measure";
import { dropOrphans } from "@/lib/parts/orphans";
import type { PartUploadOutcome } from "./build-thread";

type Tx = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];

/** A refusal found inside the transaction: recorded on the upload after the rollback. */
class Refusal extends Error {
  constructor(
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

/**
 * Import one uploaded file in a pool thread, then add its part(s) and mark the upload `ready` in one
 * transaction, or record the importer's refusal (`refused`) and drop the stored bytes. An upload that
 * `replaces` a stored part (read in another unit, laid flat, or split) changes that part instead, in
 * the same transaction. Anything unexpected is thrown so the queue retries the job.
 */
export async function runPartUploadJob(pool: Piscina, uploadId: string): Promise<void> {
  const [u] = await db().select().from(partUploads).where(eq(partUploads.id, uploadId));
  if (!u || u.state !== "checking") return; // finished by an earlier delivery of this job
  const task: PartUploadTask = { blobKey: u.blobKey, fileName: u.fileName, split: u.options.split, unit: u.options.unit as Unit | undefined, layFlat: u.options.layFlat };
  const outcome = (await pool.run(task, { name: "importPart" })) as PartUploadOutcome;
  if (!outcome.ok) return refuse(u, outcome.code, outcome.message, outcome.details);
  try {
    await db().transaction(async (tx) => {
      const ids = u.options.replaces ? await replacePart(tx, u, u.options.replaces, outcome.drafts) : await addParts(tx, u, outcome.drafts);
      await tx.update(partUploads).set({ state: "ready", partIds: ids, finishedAt: new Date() }).where(eq(partUploads.id, uploadId));
    });
  } catch (err) {
    await dropOrphans(outcome.blobs);
    if (err instanceof Refusal) return refuse(u, err.code, err.message);
    throw err;
  }
  // A split upload is stored as its bodies' own files: the original bytes serve nothing now.
  if (outcome.drafts.every((d) => d.blobKey !== u.blobKey)) await dropOrphans([u.blobKey]);
}

async function refuse(u: PartUpload, code: string, message: string, details?: Record<string, unknown>) {
  await db()
    .update(partUploads)
    .set({ state: "refused", error: { code, message, details: { file: u.fileName, ...details } }, finishedAt: new Date() })
    .where(and(eq(partUploads.id, u.id), eq(partUploads.state, "checking")));
  // The bytes go unless a part still uses them (a stored part read again keeps its own).
  await dropOrphans([u.blobKey]);
}

async function addParts(tx: Tx, u: PartUpload, drafts: PartDraft[]): Promise<string[]> {
  const rows = await tx
    .insert(parts)
    .values(drafts.map((d) => ({ ...d, workspaceId: u.workspaceId, uploadedBy: u.uploadedBy })))
    .returning({ id: parts.id });
  return rows.map((r) => r.id);
}

/**
 * The stored part read again. One draft: the same part (same id, so kits keep it) with its new unit,
 * lying and measures; several (a split): the part is replaced by one part per body, refused while a
 * kit uses it. The part row is locked first, so a concurrent delete or split waits for this one.
 */
async function replacePart(tx: Tx, u: PartUpload, partId: string, drafts: PartDraft[]): Promise<string[]> {
  const [part] = await tx.select().from(parts).where(and(eq(parts.id, partId), eq(parts.workspaceId, u.workspaceId))).for("update");
  if (!part) throw new Refusal("not_found", "The part was deleted before it could be read again.");
  if (!u.options.split) {
    const { name: _name, blobKey: _key, format: _format, byteSize: _size, ...measured } = drafts[0]!;
    await tx.update(parts).set({ ...measured, updatedAt: new Date() }).where(eq(parts.id, part.id));
    return [part.id];
  }
  const inUse = await inKitsRefusal(tx, u.workspaceId, [part.id], "split");
  if (inUse) throw new Refusal("part_in_use", inUse);
  await tx.delete(parts).where(eq(parts.id, part.id));
  const named = drafts.map((d, i) => ({ ...d, name: `${part.name} ${i + 1}`.slice(0, 120), repairs: part.repairs }));
  return addParts(tx, { ...u, uploadedBy: part.uploadedBy ?? u.uploadedBy }, named);
}
