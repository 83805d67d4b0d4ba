import "server-only";
import { and, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { idempotencyKeys, kitParts, kits, parts, plateFiles, plates, type Plate } from "@/db/schema";
import { EXPORT_FORMAT_IDS, type ExportFormatId } from "@/lib/geometry/formats";
import type { WorkspaceActor } from "@/lib/auth/actor";
import { notFound } from "@/lib/errors";
import type { Tx } from "./tx";

/** Plates: every read and write of the `plates` and `idempotency_keys` tables, within the actor's workspace. */

type Db = ReturnType<typeof db> | Tx;

/** One plate of the actor's workspace, or NotFound (another workspace's plate is not found either). */
export async function plateById(actor: WorkspaceActor, id: string, opts: { tx?: Db; lock?: boolean } = {}): Promise<Plate> {
  const q = (opts.tx ?? db())
    .select()
    .from(plates)
    .where(and(eq(plates.id, id), eq(plates.workspaceId, actor.workspaceId)));
  const [p] = opts.lock ? await q.for("update") : await q;
  if (!p) throw notFound("plate");
  return p;
}

/** The plate a build job belongs to, in the actor's workspace. */
export async function plateByJob(actor: WorkspaceActor, jobId: string): Promise<Plate> {
  const [p] = await db()
    .select()
    .from(plates)
    .where(and(eq(plates.jobId, jobId), eq(plates.workspaceId, actor.workspaceId)));
  if (!p) throw notFound("job");
  return p;
}

/** The formats a plate's files are stored in, in the registry's order. */
export async function plateFormats(actor: WorkspaceActor, plateId: string): Promise<ExportFormatId[]> {
  const rows = await db()
    .select({ format: plateFiles.format })
    .from(plateFiles)
    .innerJoin(plates, eq(plates.id, plateFiles.plateId))
    .where(and(eq(plateFiles.plateId, plateId), eq(plates.workspaceId, actor.workspaceId)));
  const have = new Set(rows.map((r) => r.format));
  return EXPORT_FORMAT_IDS.filter((f) => have.has(f));
}

/** A plate's stored file in one format, or null (not built yet, failed, or never written in it). */
export async function plateFileOf(actor: WorkspaceActor, plateId: string, format: ExportFormatId) {
  const [f] = await db()
    .select({ blobKey: plateFiles.blobKey, bytes: plateFiles.bytes, sha256: plateFiles.sha256 })
    .from(plateFiles)
    .innerJoin(plates, eq(plates.id, plateFiles.plateId))
    .where(and(eq(plateFiles.plateId, plateId), eq(plateFiles.format, format), eq(plates.workspaceId, actor.workspaceId)));
  return f ?? null;
}

export type PlateValues = Omit<typeof plates.$inferInsert, "id" | "workspaceId" | "createdAt">;

/** Insert a plate row for the actor's workspace, inside the caller's transaction (metering shares it). */
export async function insertPlate(tx: Tx, actor: WorkspaceActor, values: PlateValues): Promise<Plate> {
  const [row] = await tx
    .insert(plates)
    .values({ ...values, workspaceId: actor.workspaceId })
    .returning();
  return row!;
}

/** Record the build job queued for a plate. */
export async function setPlateJob(actor: WorkspaceActor, id: string, jobId: string): Promise<Plate> {
  const [row] = await db()
    .update(plates)
    .set({ jobId })
    .where(and(eq(plates.id, id), eq(plates.workspaceId, actor.workspaceId)))
    .returning();
  return row!;
}

/** A plate whose build could not be queued ends failed, so nothing waits for it forever. */
export async function failPlate(actor: WorkspaceActor, id: string, error: { code: string; message: string }): Promise<void> {
  await db()
    .update(plates)
    .set({ status: "failed", jobState: "failed", error })
    .where(and(eq(plates.id, id), eq(plates.workspaceId, actor.workspaceId)));
}

/** The plate an Idempotency-Key made in the last 24 hours, with the hash of the request that made it. */
export async function plateForIdempotencyKey(actor: WorkspaceActor, key: string): Promise<{ requestHash: string; plate: Plate } | null> {
  const [row] = await db()
    .select({ k: idempotencyKeys, p: plates })
    .from(idempotencyKeys)
    .innerJoin(plates, eq(plates.id, idempotencyKeys.plateId))
    .where(
      and(
        eq(idempotencyKeys.workspaceId, actor.workspaceId),
        eq(idempotencyKeys.key, key),
        sql`${idempotencyKeys.createdAt} > now() - interval '24 hours'`,
      ),
    );
  return row ? { requestHash: row.k.requestHash, plate: row.p } : null;
}

/** Claim an Idempotency-Key for a new plate; false when another request holds it already. */
export async function claimIdempotencyKey(
  tx: Tx,
  actor: WorkspaceActor,
  key: string,
  requestHash: string,
  plateId: string,
): Promise<boolean> {
  const ins = await tx
    .insert(idempotencyKeys)
    .values({ workspaceId: actor.workspaceId, key, requestHash, plateId })
    .onConflictDoNothing()
    .returning();
  return ins.length > 0;
}

/** A kit of the actor's workspace with its lines and their parts, in kit order. */
export async function kitForPlate(actor: WorkspaceActor, kitId: string) {
  const [kit] = await db()
    .select()
    .from(kits)
    .where(and(eq(kits.id, kitId), eq(kits.workspaceId, actor.workspaceId)));
  if (!kit) throw notFound("kit");
  const lines = await db()
    .select({ kp: kitParts, part: parts })
    .from(kitParts)
    .innerJoin(parts, eq(parts.id, kitParts.partId))
    .where(and(eq(kitParts.kitId, kit.id), eq(parts.workspaceId, actor.workspaceId)))
    .orderBy(kitParts.position);
  return { kit, lines };
}
