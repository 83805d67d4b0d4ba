import "server-only";
import { IMPORT_FORMATS } from "@/lib/geometry/formats";
import type { Part, PartUpload } from "@/db/schema";
import { deletePartRow, insertUpload, partById, partsByIds, refuseUnqueuedUpload, renamePart, uploadById } from "@/db/queries/parts";
import type { WorkspaceActor } from "@/lib/auth/actor";
import { type Caller } from "@/lib/auth/guards";
import { UNIT_MM, type Unit } from "@/lib/geometry/io/raw";
import { enqueuePartUpload } from "@/lib/jobs/queue";
import type { StoredBlob } from "@/lib/storage";
import { inKitsRefusal } from "./in-kits";
import { dropOrphans } from "./orphans";
import { NotFound, Conflict, Invalid } from "@/lib/errors";

export type StoredPart = { id: string; name: string; triangles: number; bodies: number; warnings: Part["warnings"]; repairs: string[] };

export type UploadView = {
  id: string;
  file: string;
  state: PartUpload["state"];
  url: string;
  parts?: StoredPart[];
  error?: { code: string; message: string; details?: Record<string, unknown> };
};

const storedPart = (p: Part): StoredPart => ({
  id: p.id,
  name: p.name,
  triangles: p.triangles,
  bodies: p.bodies,
  warnings: p.warnings,
  repairs: p.repairs,
});

/** What the library (and its upload list) is told about an upload: its state, then its parts or the refusal. */
export async function uploadView(actor: WorkspaceActor, u: PartUpload): Promise<UploadView> {
  const base = { id: u.id, file: u.fileName, state: u.state, url: `/api/parts/uploads/${u.id}` };
  if (u.state === "ready") {
    const rows = u.partIds.length ? await partsByIds(actor, u.partIds) : [];
    const order = new Map(u.partIds.map((id, i) => [id, i]));
    return { ...base, parts: rows.sort((a, b) => (order.get(a.id) ?? 0) - (order.get(b.id) ?? 0)).map(storedPart) };
  }
  if (u.state === "refused" && u.error) return { ...base, error: u.error };
  return base;
}

/**
 * Accept a stored upload: record it as `checking` and queue its import for a build worker. The bytes
 * are already in the blob store (content-addressed, so a retry reuses them).
 */
export async function queueUpload(
  caller: Caller,
  stored: StoredBlob,
  fileName: string,
  opts: { split?: boolean; unit?: Unit; layFlat?: boolean } = {},
): Promise<PartUpload> {
  const row = await insertUpload(caller, {
    fileName: fileName.slice(0, 200),
    blobKey: stored.key,
    byteSize: stored.size,
    options: { split: Boolean(opts.split), unit: opts.unit, layFlat: Boolean(opts.layFlat) },
    uploadedBy: caller.user.id,
  });
  try {
    await enqueuePartUpload(row.id);
  } catch (err) {
    await refuseUnqueuedUpload(caller, row.id);
    await dropOrphans([stored.key]);
    throw err;
  }
  return row;
}

export async function getUpload(caller: Caller, id: string): Promise<PartUpload | null> {
  return uploadById(caller, id);
}

export async function getPart(caller: Caller, id: string): Promise<Part | null> {
  return partById(caller, id);
}

/** Queue a stored part to be read again by a build worker: in another unit, laid flat, or split into its bodies. */
async function queueRework(caller: Caller, part: Part, options: { split?: boolean; unit?: Unit; layFlat?: boolean }): Promise<PartUpload> {
  const row = await insertUpload(caller, {
    fileName: `${part.name}${IMPORT_FORMATS[part.format].extensions[0]}`,
    blobKey: part.blobKey,
    byteSize: part.byteSize,
    options: { ...options, replaces: part.id },
    uploadedBy: caller.user.id,
  });
  try {
    await enqueuePartUpload(row.id);
  } catch (err) {
    await refuseUnqueuedUpload(caller, row.id);
    throw err;
  }
  return row;
}

/**
 * Rename (at once), or read in another unit (inch → mm) or lay flat: those re-read the mesh, which
 * the web process never does, so they are queued for a build worker and `upload` follows them.
 */
export async function updatePart(
  caller: Caller,
  id: string,
  change: { name?: string; unit?: Unit; layFlat?: boolean },
): Promise<{ part: Part; upload?: PartUpload }> {
  let part = await getPart(caller, id);
  if (!part) throw new NotFound("not_found", "No such part.");
  if (change.name !== undefined && change.name !== part.name) {
    const row = await renamePart(caller, id, change.name);
    if (!row) throw new NotFound("not_found", "No such part.");
    part = row;
  }
  const unit = change.unit ?? (part.unit as Unit);
  const layFlat = change.layFlat ?? part.layFlat;
  if (unit === part.unit && layFlat === part.layFlat) return { part };
  return { part, upload: await queueRework(caller, part, { unit, layFlat }) };
}

/** Split a stored multi-body part into one part per body, replacing it: queued for a build worker. */
export async function splitPart(caller: Caller, id: string): Promise<PartUpload> {
  const part = await getPart(caller, id);
  if (!part) throw new NotFound("not_found", "No such part.");
  if (part.bodies < 2) throw new Invalid("single_body", "This part has one body; there is nothing to split.");
  await refuseIfInKits(caller, [id], "split");
  return queueRework(caller, part, { split: true, unit: part.unit as Unit, layFlat: part.layFlat });
}

async function refuseIfInKits(caller: Caller, ids: string[], verb: string) {
  const refusal = await inKitsRefusal(caller, ids, verb);
  if (refusal) throw new Conflict("part_in_use", refusal);
}

export async function deletePart(caller: Caller, id: string): Promise<void> {
  const part = await getPart(caller, id);
  if (!part) throw new NotFound("not_found", "No such part.");
  await refuseIfInKits(caller, [id], "delete");
  await deletePartRow(caller, id);
  await dropOrphans([part.blobKey]);
}

export const PART_UNITS = Object.keys(UNIT_MM) as Unit[];
