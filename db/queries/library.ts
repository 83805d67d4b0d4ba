import "server-only";
import { and, asc, desc, eq, isNull, max, sql } from "drizzle-orm";
import { db } from "@/db";
import { plateFiles, kitParts, kits, plates, templates, templateVersions, users } from "@/db/schema";
import type { ExportFormatId } from "@/lib/geometry/formats";
import type { WorkspaceActor } from "@/lib/auth/actor";

// Every read is scoped to the actor's workspace; there is no query here without that filter.

export async function listKits(actor: WorkspaceActor) {
  const pieceCounts = db()
    .select({ kitId: kitParts.kitId, pieces: sql<number>`coalesce(sum(${kitParts.quantity}), 0)::int`.as("pieces") })
    .from(kitParts)
    .groupBy(kitParts.kitId)
    .as("piece_counts");
  const lastPlates = db()
    .select({ kitId: plates.kitId, lastPlateAt: max(plates.createdAt).as("last_plate_at") })
    .from(plates)
    .where(eq(plates.workspaceId, actor.workspaceId))
    .groupBy(plates.kitId)
    .as("last_plates");
  return db()
    .select({
      id: kits.id,
      name: kits.name,
      description: kits.description,
      updatedAt: kits.updatedAt,
      pieces: sql<number>`coalesce(${pieceCounts.pieces}, 0)`,
      lastPlateAt: lastPlates.lastPlateAt,
    })
    .from(kits)
    .leftJoin(pieceCounts, eq(pieceCounts.kitId, kits.id))
    .leftJoin(lastPlates, eq(lastPlates.kitId, kits.id))
    .where(and(eq(kits.workspaceId, actor.workspaceId), isNull(kits.archivedAt)))
    .orderBy(asc(kits.name));
}

export async function listPlates(actor: WorkspaceActor, filter: { kitId?: string; limit?: number } = {}) {
  return db()
    .select({
      id: plates.id,
      status: plates.status,
      jobState: plates.jobState,
      source: plates.source,
      pieceCount: plates.pieceCount,
      createdAt: plates.createdAt,
      kitId: plates.kitId,
      kitName: kits.name,
      title: plates.title,
      reference: plates.reference,
      estimates: plates.estimates,
      findings: plates.findings,
      error: plates.error,
      proofSummary: sql<string | null>`${plates.proof}->>'summary'`,
      proofOk: sql<boolean | null>`(${plates.proof}->>'ok')::boolean`,
      files: sql<
        ExportFormatId[]
      >`coalesce((select array_agg(${plateFiles.format}) from ${plateFiles} where ${plateFiles.plateId} = ${plates.id}), '{}')`,
      makerName: users.name,
      makerEmail: users.email,
      templateId: templates.id,
      templateName: templates.name,
      templateVersion: templateVersions.version,
      remakeable: sql<boolean>`${plates.input} is not null`,
    })
    .from(plates)
    .leftJoin(kits, eq(kits.id, plates.kitId))
    .leftJoin(templateVersions, eq(templateVersions.id, plates.templateVersionId))
    .leftJoin(templates, eq(templates.id, templateVersions.templateId))
    .leftJoin(users, eq(users.id, plates.createdBy))
    .where(and(eq(plates.workspaceId, actor.workspaceId), filter.kitId ? eq(plates.kitId, filter.kitId) : undefined))
    .orderBy(desc(plates.createdAt))
    .limit(filter.limit ?? 100);
}
export type PlateRow = Awaited<ReturnType<typeof listPlates>>[number];
