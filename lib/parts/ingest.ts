import "server-only";
import { and, eq, inArray, sql } from "drizzle-orm";
import { db } from "@/db";
import { kitParts, kits, parts, type Part } from "@/db/schema";
import { UserError, type Caller } from "@/lib/auth/guards";
import { MeshImportError } from "@/lib/geometry/errors";
import { importMesh, type ImportResult } from "@/lib/geometry/import";
import { stem } from "@/lib/geometry/io/stl-read";
import { writeBinaryStl } from "@/lib/geometry/io/stl-write";
import { UNIT_MM, type Unit } from "@/lib/geometry/io/raw";
import { bounds, combineMeshes, signedVolume, type IndexedMesh } from "@/lib/geometry/mesh";
import { orientMesh } from "@/lib/geometry/orient";
import { topViewSvg } from "@/lib/geometry/thumbnail";
import { serverKernel } from "@/lib/kernel-server";
import { blobStore } from "@/lib/storage";

export type StoredPart = { id: string; name: string; triangles: number; bodies: number; warnings: Part["warnings"]; repairs: string[] };
export type IngestOutcome =
  | { ok: true; file: string; parts: StoredPart[] }
  | { ok: false; file: string; code: string; message: string; details?: Record<string, unknown> };


/** Everything the library shows about a part, measured on the mesh as it will stand on the slab. */
async function measure(mesh: IndexedMesh, layFlat: boolean) {
  const oriented = orientMesh(mesh, { layFlat });
  const b = bounds(oriented);
  const thumb = topViewSvg(await serverKernel(), oriented);
  return {
    triangles: oriented.triVerts.length / 3,
    sizeX: b.max[0] - b.min[0],
    sizeY: b.max[1] - b.min[1],
    sizeZ: b.max[2] - b.min[2],
    volume: signedVolume(oriented),
    contactArea: thumb.contactArea,
    thumbnailSvg: thumb.svg,
  };
}

function refusal(file: string, err: unknown): IngestOutcome {
  if (err instanceof MeshImportError) return { ok: false, file, code: err.code, message: err.plain, details: err.details };
  throw err;
}

/** Remove blobs this request stored if nothing refers to them (the rows did not land). */
async function dropOrphans(keys: string[]) {
  for (const key of keys) {
    const [used] = await db().execute<{ n: number }>(sql`select (select count(*) from parts where blob_key = ${key}) + (select count(*) from plates where stl_blob_key = ${key} or three_mf_blob_key = ${key}) as n`).then((r) => r.rows);
    if (Number(used?.n ?? 0) === 0) await blobStore().delete(key);
  }
}

/**
 * Import one uploaded file and store it as one part (all its bodies together) or, with `split`, one
 * part per body. The bytes go to the blob store first (content-addressed, so a retry reuses them),
 * then every row in one transaction; if the rows fail, blobs this call created are removed again.
 */
export async function ingestFile(caller: Caller, bytes: Uint8Array, fileName: string, opts: { split?: boolean; unit?: Unit; layFlat?: boolean } = {}): Promise<IngestOutcome> {
  const kernel = await serverKernel();
  let result: ImportResult;
  try {
    result = importMesh(bytes, kernel, { fileName, unit: opts.unit });
  } catch (err) {
    return refusal(fileName, err);
  }
  const created: string[] = [];
  try {
    const groups = opts.split && result.bodies.length > 1 ? result.bodies.map((b) => ({ name: b.name, meshes: [b.mesh], own: true })) : [{ name: stem(fileName) || "part", meshes: result.bodies.map((b) => b.mesh), own: false }];
    const rows: (typeof parts.$inferInsert)[] = [];
    for (const g of groups) {
      const mesh = combineMeshes(g.meshes);
      // A split body is stored as its own STL (already in millimetres); a whole file as uploaded.
      const data = g.own ? writeBinaryStl([mesh]) : bytes;
      const put = await blobStore().put(data);
      if (put.created) created.push(put.key);
      rows.push({
        workspaceId: caller.workspace.id,
        name: g.name.slice(0, 120),
        format: g.own ? ("stl" as const) : result.format,
        blobKey: put.key,
        byteSize: data.byteLength,
        unit: g.own ? "millimeter" : result.unit,
        layFlat: Boolean(opts.layFlat),
        bodies: g.meshes.length,
        repairs: result.repairs.map((r) => r.message),
        warnings: result.warnings,
        uploadedBy: caller.user.id,
        ...(await measure(mesh, Boolean(opts.layFlat))),
      });
    }
    const stored = await db().transaction(async (tx) => tx.insert(parts).values(rows).returning());
    return { ok: true, file: fileName, parts: stored.map((p) => ({ id: p.id, name: p.name, triangles: p.triangles, bodies: p.bodies, warnings: p.warnings, repairs: p.repairs })) };
  } catch (err) {
    await dropOrphans(created);
    throw err;
  }
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
