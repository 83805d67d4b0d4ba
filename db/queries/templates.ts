import { and, asc, desc, eq, ilike, isNull, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { templates, templateVersions, users, type Template, type TemplateVersion } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { Tx } from "./tx";

/**
 * Templates: every read and write of `templates` and `template_versions`. A workspace sees its own
 * templates and the starters (workspace_id null); it writes only its own. The worker draws the
 * versions' thumbnails through the last three queries, so no server-only import here.
 */

type Db = ReturnType<typeof db> | Tx;

const visible = (actor: WorkspaceActor) => or(eq(templates.workspaceId, actor.workspaceId), isNull(templates.workspaceId));

/** The templates list: each template with its current version, the workspace's own first. */
export async function templateRows(actor: WorkspaceActor, filter: { q?: string; archived?: boolean } = {}) {
  const q = filter.q?.trim();
  return db()
    .select({
      id: templates.id,
      name: templates.name,
      description: templates.description,
      starter: sql<boolean>`${templates.workspaceId} is null`,
      version: templates.currentVersion,
      archivedAt: templates.archivedAt,
      updatedAt: templates.updatedAt,
      variables: templateVersions.variables,
      thumbnailSvg: templateVersions.thumbnailSvg,
      thumbnailState: templateVersions.thumbnailState,
      findings: templateVersions.findings,
      options: templateVersions.options,
      updatedBy: users.name,
    })
    .from(templates)
    .innerJoin(templateVersions, and(eq(templateVersions.templateId, templates.id), eq(templateVersions.version, templates.currentVersion)))
    .leftJoin(users, eq(users.id, templateVersions.createdBy))
    .where(
      and(
        visible(actor),
        filter.archived ? sql`${templates.archivedAt} is not null` : isNull(templates.archivedAt),
        q ? or(ilike(templates.name, `%${q}%`), ilike(templates.description, `%${q}%`)) : undefined,
      ),
    )
    .orderBy(sql`${templates.workspaceId} is null`, desc(templates.updatedAt), asc(templates.name));
}

/** A template the actor's workspace sees (its own or a starter), or null. */
export async function templateById(actor: WorkspaceActor, id: string): Promise<Template | null> {
  const [t] = await db()
    .select()
    .from(templates)
    .where(and(eq(templates.id, id), visible(actor)));
  return t ?? null;
}

/** A template the actor's workspace sees, locked for the caller's transaction (the service refuses starters). */
export async function lockTemplate(tx: Tx, actor: WorkspaceActor, id: string): Promise<Template | null> {
  const [t] = await tx
    .select()
    .from(templates)
    .where(and(eq(templates.id, id), visible(actor)))
    .for("update");
  return t ?? null;
}

/** Every version of a template the actor's workspace sees, newest first, with who saved it. */
export async function templateVersionRows(actor: WorkspaceActor, templateId: string) {
  return db()
    .select({ v: templateVersions, by: users.name, byEmail: users.email })
    .from(templateVersions)
    .innerJoin(templates, eq(templates.id, templateVersions.templateId))
    .leftJoin(users, eq(users.id, templateVersions.createdBy))
    .where(and(eq(templateVersions.templateId, templateId), visible(actor)))
    .orderBy(desc(templateVersions.version));
}

/** Version `version` of a template the actor's workspace sees, or null. */
export async function templateVersion(
  actor: WorkspaceActor,
  templateId: string,
  version: number,
  opts: { tx?: Db } = {},
): Promise<TemplateVersion | null> {
  const [row] = await (opts.tx ?? db())
    .select({ v: templateVersions })
    .from(templateVersions)
    .innerJoin(templates, eq(templates.id, templateVersions.templateId))
    .where(and(eq(templateVersions.templateId, templateId), eq(templateVersions.version, version), visible(actor)));
  return row?.v ?? null;
}

/** The name and version number a plate's template version stands for (for the plate map), or null. */
export async function templateLabel(actor: WorkspaceActor, versionId: string): Promise<{ name: string; version: number } | null> {
  const [t] = await db()
    .select({ name: templates.name, version: templateVersions.version })
    .from(templateVersions)
    .innerJoin(templates, eq(templates.id, templateVersions.templateId))
    .where(and(eq(templateVersions.id, versionId), visible(actor)));
  return t ?? null;
}

export type TemplateValues = Pick<typeof templates.$inferInsert, "name" | "description" | "createdBy">;
export type VersionValues = Omit<typeof templateVersions.$inferInsert, "id" | "templateId" | "createdAt">;

/** Insert a template of the actor's workspace, inside the caller's transaction. */
export async function insertTemplate(tx: Tx, actor: WorkspaceActor, values: TemplateValues): Promise<Template> {
  const [t] = await tx
    .insert(templates)
    .values({ ...values, workspaceId: actor.workspaceId })
    .returning();
  return t!;
}

/** Insert a version of a template the caller has just inserted or locked (versions carry no workspace). */
export async function insertTemplateVersion(tx: Tx, templateId: string, values: VersionValues): Promise<TemplateVersion> {
  const [v] = await tx
    .insert(templateVersions)
    .values({ ...values, templateId })
    .returning();
  return v!;
}

/** Make `version` a template's current one. */
export async function setCurrentVersion(tx: Tx, actor: WorkspaceActor, id: string, version: number): Promise<void> {
  await tx
    .update(templates)
    .set({ currentVersion: version, updatedAt: new Date() })
    .where(and(eq(templates.id, id), eq(templates.workspaceId, actor.workspaceId)));
}

export async function setTemplateArchived(tx: Tx, actor: WorkspaceActor, id: string, archived: boolean): Promise<void> {
  await tx
    .update(templates)
    .set({ archivedAt: archived ? new Date() : null, updatedAt: new Date() })
    .where(and(eq(templates.id, id), eq(templates.workspaceId, actor.workspaceId)));
}

export async function setTemplateName(tx: Tx, actor: WorkspaceActor, id: string, name: string, description: string): Promise<void> {
  await tx
    .update(templates)
    .set({ name, description, updatedAt: new Date() })
    .where(and(eq(templates.id, id), eq(templates.workspaceId, actor.workspaceId)));
}

// ---------------------------------------------------------------- thumbnails (the worker, for every workspace and the starters)

/** A version whose top view is to be drawn; the job names the version alone (starters have no workspace). */
export async function versionForThumbnail(versionId: string): Promise<TemplateVersion | null> {
  const [v] = await db().select().from(templateVersions).where(eq(templateVersions.id, versionId));
  return v ?? null;
}

export async function setThumbnail(
  versionId: string,
  set: Pick<typeof templateVersions.$inferInsert, "thumbnailState" | "thumbnailSvg" | "findings">,
): Promise<void> {
  await db().update(templateVersions).set(set).where(eq(templateVersions.id, versionId));
}

/** Versions whose top view is still to be drawn (seeded starters, or a queue that was down). */
export async function pendingThumbnails(): Promise<{ id: string }[]> {
  return db().select({ id: templateVersions.id }).from(templateVersions).where(eq(templateVersions.thumbnailState, "pending"));
}
