import type { Piscina } from "piscina";
import { runOnPool } from "./pool-run";
import type { PartUpload } from "@/db/schema";
import { deletePartRow, finishUpload, insertParts, lockPart, refuseUpload, setPartMeasures, uploadForImport } from "@/db/queries/parts";
import { transaction, type Tx } from "@/db/queries/tx";
import { systemActor } from "@/lib/auth/actor";
import type { Unit } from "@/lib/geometry/io/raw";
import { inKitsRefusal } from "@/lib/parts/in-kits";
import type { PartDraft, PartUploadTask } from "@/lib/parts/measure";
import { dropOrphans } from "@/lib/parts/orphans";
import type { PartUploadOutcome } from "./build-thread";

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
  const u = await uploadForImport(uploadId);
  if (!u || u.state !== "checking") return; // finished by an earlier delivery of this job
  const actor = systemActor(u.workspaceId);
  const task: PartUploadTask = {
    blobKey: u.blobKey,
    fileName: u.fileName,
    split: u.options.split,
    unit: u.options.unit as Unit | undefined,
    layFlat: u.options.layFlat,
  };
  const outcome = await runOnPool<PartUploadOutcome>(pool, task, { name: "importPart" });
  if (!outcome.ok) return refuse(u, outcome.code, outcome.message, outcome.details);
  try {
    await transaction(async (tx) => {
      const ids = u.options.replaces ? await replacePart(tx, u, u.options.replaces, outcome.drafts) : await addParts(tx, u, outcome.drafts);
      await finishUpload(tx, actor, uploadId, ids);
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
  await refuseUpload(systemActor(u.workspaceId), u.id, { code, message, details: { file: u.fileName, ...details } });
  // The bytes go unless a part still uses them (a stored part read again keeps its own).
  await dropOrphans([u.blobKey]);
}

async function addParts(tx: Tx, u: PartUpload, drafts: PartDraft[]): Promise<string[]> {
  return insertParts(
    tx,
    systemActor(u.workspaceId),
    drafts.map((d) => ({ ...d, uploadedBy: u.uploadedBy })),
  );
}

/**
 * The stored part read again. One draft: the same part (same id, so kits keep it) with its new unit,
 * lying and measures; several (a split): the part is replaced by one part per body, refused while a
 * kit uses it. The part row is locked first, so a concurrent delete or split waits for this one.
 */
async function replacePart(tx: Tx, u: PartUpload, partId: string, drafts: PartDraft[]): Promise<string[]> {
  const actor = systemActor(u.workspaceId);
  const part = await lockPart(tx, actor, partId);
  if (!part) throw new Refusal("not_found", "The part was deleted before it could be read again.");
  if (!u.options.split) {
    const { name: _name, blobKey: _key, format: _format, byteSize: _size, ...measured } = drafts[0]!;
    await setPartMeasures(tx, actor, part.id, measured);
    return [part.id];
  }
  const inUse = await inKitsRefusal(actor, [part.id], "split", { tx });
  if (inUse) throw new Refusal("part_in_use", inUse);
  await deletePartRow(actor, part.id, { tx });
  const named = drafts.map((d, i) => ({ ...d, name: `${part.name} ${i + 1}`.slice(0, 120), repairs: part.repairs }));
  return addParts(tx, { ...u, uploadedBy: part.uploadedBy ?? u.uploadedBy }, named);
}
