import { and, asc, count, desc, eq, ilike, inArray, type SQL } from "drizzle-orm";
import { db } from "@/db";
import { kitParts, kits, partUploads, parts, users, type Part, type PartUpload } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { Tx } from "./tx";

/**
 * Parts and part uploads: every read and write of `parts` and `part_uploads`, within the actor's
 * workspace. The worker imports uploads through these too (as the system, for the upload's
 * workspace), so no server-only import here.
 */

type Db = ReturnType<typeof db> | Tx;

export const PART_SORTS = {
  name: parts.name,
  triangles: parts.triangles,
  volume: parts.volume,
  contactArea: parts.contactArea,
  createdAt: parts.createdAt,
  sizeZ: parts.sizeZ,
} as const;
export type PartSort = keyof typeof PART_SORTS;

/** The parts library: one page of the actor's workspace's parts, searched by name and sorted. */
export async function searchParts(
  actor: WorkspaceActor,
  q: { search?: string; sort?: PartSort; dir?: "asc" | "desc"; page?: number; pageSize?: number },
) {
  const pageSize = Math.min(100, Math.max(1, q.pageSize ?? 20));
  const page = Math.max(1, q.page ?? 1);
  const conds: SQL[] = [eq(parts.workspaceId, actor.workspaceId)];
  if (q.search?.trim()) conds.push(ilike(parts.name, `%${q.search.trim().replace(/[%_\\]/g, (c) => `\\${c}`)}%`));
  const where = and(...conds);
  const col = PART_SORTS[q.sort ?? "createdAt"];
  const order = q.dir === "asc" ? asc(col) : desc(col);
  const [total] = await db().select({ n: count() }).from(parts).where(where);
  const rows = await db()
    .select({
      id: parts.id,
      name: parts.name,
      format: parts.format,
      triangles: parts.triangles,
      sizeX: parts.sizeX,
      sizeY: parts.sizeY,
      sizeZ: parts.sizeZ,
      volume: parts.volume,
      contactArea: parts.contactArea,
      repairs: parts.repairs,
      warnings: parts.warnings,
      unit: parts.unit,
      layFlat: parts.layFlat,
      bodies: parts.bodies,
      createdAt: parts.createdAt,
      uploadedBy: users.name,
    })
    .from(parts)
    .leftJoin(users, eq(users.id, parts.uploadedBy))
    .where(where)
    .orderBy(order, asc(parts.id))
    .limit(pageSize)
    .offset((page - 1) * pageSize);
  return { rows, total: total?.n ?? 0, page, pageSize, pages: Math.max(1, Math.ceil((total?.n ?? 0) / pageSize)) };
}

/** One part of the actor's workspace, or null. */
export async function partById(actor: WorkspaceActor, id: string): Promise<Part | null> {
  const [p] = await db()
    .select()
    .from(parts)
    .where(and(eq(parts.id, id), eq(parts.workspaceId, actor.workspaceId)));
  return p ?? null;
}

/** The actor's workspace's parts among `ids` (in no particular order). */
export async function partsByIds(actor: WorkspaceActor, ids: string[]): Promise<Part[]> {
  return db()
    .select()
    .from(parts)
    .where(and(inArray(parts.id, ids), eq(parts.workspaceId, actor.workspaceId)));
}

/** Rename a part; null when the workspace has no such part. */
export async function renamePart(actor: WorkspaceActor, id: string, name: string): Promise<Part | null> {
  const [row] = await db()
    .update(parts)
    .set({ name, updatedAt: new Date() })
    .where(and(eq(parts.id, id), eq(parts.workspaceId, actor.workspaceId)))
    .returning();
  return row ?? null;
}

/** Delete a part, inside the caller's transaction when it has one. */
export async function deletePartRow(actor: WorkspaceActor, id: string, opts: { tx?: Db } = {}): Promise<void> {
  await (opts.tx ?? db()).delete(parts).where(and(eq(parts.id, id), eq(parts.workspaceId, actor.workspaceId)));
}

export type PartValues = Omit<typeof parts.$inferInsert, "id" | "workspaceId" | "createdAt">;

/** Add parts to the actor's workspace inside the caller's transaction; their ids, in order. */
export async function insertParts(tx: Tx, actor: WorkspaceActor, values: PartValues[]): Promise<string[]> {
  const rows = await tx
    .insert(parts)
    .values(values.map((v) => ({ ...v, workspaceId: actor.workspaceId })))
    .returning({ id: parts.id });
  return rows.map((r) => r.id);
}

/** A part locked for the caller's transaction (a concurrent delete or split waits for it), or null. */
export async function lockPart(tx: Tx, actor: WorkspaceActor, id: string): Promise<Part | null> {
  const [part] = await tx
    .select()
    .from(parts)
    .where(and(eq(parts.id, id), eq(parts.workspaceId, actor.workspaceId)))
    .for("update");
  return part ?? null;
}

/** A part read again: its new unit, lying and measures. */
export async function setPartMeasures(tx: Tx, actor: WorkspaceActor, id: string, measured: Partial<PartValues>): Promise<void> {
  await tx
    .update(parts)
    .set({ ...measured, updatedAt: new Date() })
    .where(and(eq(parts.id, id), eq(parts.workspaceId, actor.workspaceId)));
}

/** The names of the actor's workspace's kits that use any of the parts (each once). */
export async function kitsUsingParts(actor: WorkspaceActor, ids: string[], opts: { tx?: Db } = {}): Promise<string[]> {
  const using = await (opts.tx ?? db())
    .selectDistinct({ name: kits.name })
    .from(kitParts)
    .innerJoin(kits, eq(kits.id, kitParts.kitId))
    .where(and(inArray(kitParts.partId, ids), eq(kits.workspaceId, actor.workspaceId)));
  return using.map((k) => k.name);
}

// ---------------------------------------------------------------- uploads

export type UploadValues = Omit<
  typeof partUploads.$inferInsert,
  "id" | "workspaceId" | "createdAt" | "state" | "partIds" | "error" | "finishedAt"
>;

/** Record an upload (`checking`) of the actor's workspace. */
export async function insertUpload(actor: WorkspaceActor, values: UploadValues): Promise<PartUpload> {
  const [row] = await db()
    .insert(partUploads)
    .values({ ...values, workspaceId: actor.workspaceId })
    .returning();
  return row!;
}

/** One upload of the actor's workspace, or null. */
export async function uploadById(actor: WorkspaceActor, id: string): Promise<PartUpload | null> {
  const [u] = await db()
    .select()
    .from(partUploads)
    .where(and(eq(partUploads.id, id), eq(partUploads.workspaceId, actor.workspaceId)));
  return u ?? null;
}

/** The upload an import job names (the job carries the id alone; the worker then acts for its workspace). */
export async function uploadForImport(id: string): Promise<PartUpload | null> {
  const [u] = await db().select().from(partUploads).where(eq(partUploads.id, id));
  return u ?? null;
}

/** An upload whose import could not be queued is refused at once, so nothing waits for it. */
export async function refuseUnqueuedUpload(actor: WorkspaceActor, id: string): Promise<void> {
  await db()
    .update(partUploads)
    .set({
      state: "refused",
      finishedAt: new Date(),
      error: { code: "queue_unavailable", message: "The import queue is not available; try again in a moment." },
    })
    .where(and(eq(partUploads.id, id), eq(partUploads.workspaceId, actor.workspaceId)));
}

/** The import's refusal, recorded only while the upload is still `checking`. */
export async function refuseUpload(actor: WorkspaceActor, id: string, error: NonNullable<PartUpload["error"]>): Promise<void> {
  await db()
    .update(partUploads)
    .set({ state: "refused", error, finishedAt: new Date() })
    .where(and(eq(partUploads.id, id), eq(partUploads.workspaceId, actor.workspaceId), eq(partUploads.state, "checking")));
}

/** The upload's parts are stored: `ready`, with their ids, inside the transaction that stored them. */
export async function finishUpload(tx: Tx, actor: WorkspaceActor, id: string, partIds: string[]): Promise<void> {
  await tx
    .update(partUploads)
    .set({ state: "ready", partIds, finishedAt: new Date() })
    .where(and(eq(partUploads.id, id), eq(partUploads.workspaceId, actor.workspaceId)));
}
