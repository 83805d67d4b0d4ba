import "server-only";
import { and, eq, inArray } from "drizzle-orm";
import { db } from "@/db";
import { kitParts, kits, partUploads, parts, type Part, type PartUpload } from "@/db/schema";
import { UserError, type Caller } from "@/lib/auth/guards";
import { importMesh } from "@/lib/geometry/import";
import { writeBinaryStl } from "@/lib/geometry/io/stl-write";
import { UNIT_MM, type Unit } from "@/lib/geometry/io/raw";
import { combineMeshes, type IndexedMesh } from "@/lib/geometry/mesh";
import { orientMesh } from "@/lib/geometry/orient";
import { enqueuePartUpload } from "@/lib/jobs/queue";
import { serverKernel } from "@/lib/kernel-server";
import { blobStore, type StoredBlob } from "@/lib/storage";
import { measure as measureWith } from "./measure";
import { dropOrphans } from "./orphans";

export type StoredPart = { id: string; name: string; triangles: number; bodies: number; warnings: Part["warnings"]; repairs: string[] };

const measure = async (mesh: IndexedMesh, layFlat: boolean) => measureWith(await serverKernel(), mesh, layFlat);

export type UploadView = {
  id: string;
  file: string;
  state: PartUpload["state"];
  url: string;
  parts?: StoredPart[];
  error?: { code: string; message: string; details?: Record<string, unknown> };
};

const storedPart = (p: Part): StoredPart => ({ id: p.id, name: p.name, triangles: p.triangles, bodies: p.bodies, warnings: p.warnings, repairs: p.repairs });

/** What the library (and its upload list) is told about an upload: its state, then its parts or the refusal. */
export async function uploadView(u: PartUpload): Promise<UploadView> {
  const base = { id: u.id, file: u.fileName, state: u.state, url: `/api/parts/uploads/${u.id}` };
  if (u.state === "ready") {
    const rows = u.partIds.length ? await db().select().from(parts).where(and(inArray(parts.id, u.partIds), eq(parts.workspaceId, u.workspaceId))) : [];
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
export async function queueUpload(caller: Caller, stored: StoredBlob, fileName: string, opts: { split?: boolean; unit?: Unit; layFlat?: boolean } = {}): Promise<PartUpload> {
  const [row] = await db()
    .insert(partUploads)
    .values({ workspaceId: caller.workspace.id, fileName: fileName.slice(0, 200), blobKey: stored.key, byteSize: stored.size, options: { split: Boolean(opts.split), unit: opts.unit, layFlat: Boolean(opts.layFlat) }, uploadedBy: caller.user.id })
    .returning();
  try {
    await enqueuePartUpload(row!.id);
  } catch (err) {
    await db().update(partUploads).set({ state: "refused", finishedAt: new Date(), error: { code: "queue_unavailable", message: "The import queue is not available; try again in a moment." } }).where(eq(partUploads.id, row!.id));
    await dropOrphans([stored.key]);
    throw err;
  }
  return row!;
}

export async function getUpload(caller: Caller, id: string): Promise<PartUpload | null> {
  const [u] = await db().select().from(partUploads).where(and(eq(partUploads.id, id), eq(partUploads.workspaceId, caller.workspace.id)));
  return u ?? null;
}

export async function getPart(caller: Caller, id: string): Promise<Part | null> {
  const [p] = await db().select().from(parts).where(and(eq(parts.id, id), eq(parts.workspaceId, caller.workspace.id)));
  return p ?? null;
}

const EXT: Record<Part["format"], string> = { stl: "stl", "3mf": "3mf", obj: "obj" };

/** A stored part's mesh as it stands on the slab: re-read from its bytes in its unit, then oriented. */
export async function loadPartMesh(part: Part): Promise<IndexedMesh> {
  const bytes = await blobStore().get(part.blobKey);
  const r = importMesh(bytes, await serverKernel(), { fileName: `${part.name}.${EXT[part.format]}`, unit: part.unit as Unit });
  return orientMesh(combineMeshes(r.bodies.map((b) => b.mesh)), { layFlat: part.layFlat });
}

/** Rename, change the unit it is read in, or lay it flat; measurements follow. */
export async function updatePart(caller: Caller, id: string, change: { name?: string; unit?: Unit; layFlat?: boolean }): Promise<Part> {
  const part = await getPart(caller, id);
  if (!part) throw new UserError("not_found", "No such part.");
  const next = { ...part, ...change };
  let measured = {};
  if ((change.unit && change.unit !== part.unit) || (change.layFlat !== undefined && change.layFlat !== part.layFlat)) {
    const bytes = await blobStore().get(part.blobKey);
    const r = importMesh(bytes, await serverKernel(), { fileName: `${part.name}.${EXT[part.format]}`, unit: next.unit as Unit });
    measured = { ...(await measure(combineMeshes(r.bodies.map((b) => b.mesh)), next.layFlat)), warnings: r.warnings };
  }
  const [row] = await db()
    .update(parts)
    .set({ name: next.name, unit: next.unit, layFlat: next.layFlat, ...measured, updatedAt: new Date() })
    .where(and(eq(parts.id, id), eq(parts.workspaceId, caller.workspace.id)))
    .returning();
  return row!;
}

/** Split a stored multi-body part into one part per body, replacing it, in one transaction. */
export async function splitPart(caller: Caller, id: string): Promise<StoredPart[]> {
  const part = await getPart(caller, id);
  if (!part) throw new UserError("not_found", "No such part.");
  if (part.bodies < 2) throw new UserError("single_body", "This part has one body; there is nothing to split.");
  await refuseIfInKits(caller, [id], "split");
  const bytes = await blobStore().get(part.blobKey);
  const r = importMesh(bytes, await serverKernel(), { fileName: `${part.name}.${EXT[part.format]}`, unit: part.unit as Unit });
  const created: string[] = [];
  try {
    const rows: (typeof parts.$inferInsert)[] = [];
    for (const [i, body] of r.bodies.entries()) {
      const data = writeBinaryStl([body.mesh]);
      const put = await blobStore().put(data);
      if (put.created) created.push(put.key);
      rows.push({
        workspaceId: caller.workspace.id,
        name: `${part.name} ${i + 1}`,
        format: "stl" as const,
        blobKey: put.key,
        byteSize: data.byteLength,
        layFlat: part.layFlat,
        repairs: part.repairs,
        uploadedBy: caller.user.id,
        ...(await measure(body.mesh, part.layFlat)),
      });
    }
    const stored = await db().transaction(async (tx) => {
      await tx.delete(parts).where(and(eq(parts.id, id), eq(parts.workspaceId, caller.workspace.id)));
      return tx.insert(parts).values(rows).returning();
    });
    await dropOrphans([part.blobKey]);
    return stored.map((p) => ({ id: p.id, name: p.name, triangles: p.triangles, bodies: p.bodies, warnings: p.warnings, repairs: p.repairs }));
  } catch (err) {
    await dropOrphans(created);
    throw err;
  }
}

async function refuseIfInKits(caller: Caller, ids: string[], verb: string) {
  const using = await db()
    .selectDistinct({ name: kits.name })
    .from(kitParts)
    .innerJoin(kits, eq(kits.id, kitParts.kitId))
    .where(and(inArray(kitParts.partId, ids), eq(kits.workspaceId, caller.workspace.id)));
  if (using.length) {
    const names = using.map((k) => `“${k.name}”`).join(", ");
    throw new UserError("part_in_use", `This part is used by ${using.length === 1 ? "the kit" : "the kits"} ${names}; take it out of ${using.length === 1 ? "that kit" : "those kits"} before you ${verb} it.`);
  }
}

export async function deletePart(caller: Caller, id: string): Promise<void> {
  const part = await getPart(caller, id);
  if (!part) throw new UserError("not_found", "No such part.");
  await refuseIfInKits(caller, [id], "delete");
  await db().delete(parts).where(and(eq(parts.id, id), eq(parts.workspaceId, caller.workspace.id)));
  await dropOrphans([part.blobKey]);
}

export const PART_UNITS = Object.keys(UNIT_MM) as Unit[];
