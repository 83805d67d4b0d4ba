import "server-only";
import { TEMPLATE_NAME_KEY, type TemplateVersion } from "@/db/schema";
import {
  insertTemplate,
  insertTemplateVersion,
  lockTemplate,
  setCurrentVersion,
  setTemplateArchived,
  setTemplateName,
  templateById,
  templateRows,
  templateVersion,
  templateVersionRows,
} from "@/db/queries/templates";
import { isUniqueViolation, transaction, type Tx } from "@/db/queries/tx";
import type { WorkspaceActor } from "@/lib/auth/actor";
import { audit } from "@/lib/audit";
import { LOGO_LIMITS, logoContours } from "@/lib/geometry/marks/logo";
import type { SlabOptionsInput } from "@/lib/geometry/options";
import { describeChanges, templateBodySchema, type TemplateBody, type TemplateVariableDef } from "@/lib/geometry/template";
import { billingOf } from "@/lib/billing/service";
import { enqueueThumbnail } from "@/lib/jobs/queue";
import { PlanLimit, NotFound, Conflict, Invalid } from "@/lib/errors";

/**
 * Templates of a workspace, and the starters every workspace sees (workspace_id null). A template's
 * options live in numbered versions: saving adds a version and never changes an old one, so a plate
 * made from version n can be made again exactly.
 */

/** Who changes a template: the acting identity, with the address its audit lines name. */
export type Actor = WorkspaceActor & { email?: string | null };

/** Check a template's options and variables; the message says what to fix. */
export function checkBody(input: unknown): TemplateBody {
  const r = templateBodySchema.safeParse(input);
  if (!r.success) {
    const issue = r.error.issues[0]!;
    throw new Invalid("invalid_template", issue.message, undefined, issue.path.join("."));
  }
  const logo = r.data.options.marks.logo;
  if (logo) {
    const points = logoContours(logo, logo.width).reduce((n, p) => n + p.contours.reduce((m, c) => m + c.length, 0), 0);
    if (points > LOGO_LIMITS.points)
      throw new Invalid(
        "invalid_template",
        `The logo flattens to ${points.toLocaleString("en-US")} points at ${logo.width} mm; at most ` +
          `${LOGO_LIMITS.points.toLocaleString("en-US")}.`,
        undefined,
        "options.marks.logo",
      );
  }
  return r.data;
}

export async function listTemplates(actor: WorkspaceActor, filter: { q?: string; archived?: boolean } = {}) {
  return templateRows(actor, filter);
}
export type TemplateRow = Awaited<ReturnType<typeof listTemplates>>[number];

export async function getTemplate(actor: WorkspaceActor, id: string) {
  const t = await templateById(actor, id);
  if (!t) throw new NotFound("not_found", "No such template.");
  const versions = await templateVersionRows(actor, t.id);
  return {
    template: t,
    versions: versions.map((r) => ({ ...r.v, by: r.by ?? r.byEmail ?? (t.workspaceId ? "—" : "Slabwright") })),
    current: versions.find((r) => r.v.version === t.currentVersion)!.v,
  };
}

/** A template version a plate will use: the current one, or the one asked for. */
export async function versionForPlate(
  a: WorkspaceActor,
  templateId: string,
  version?: number,
): Promise<TemplateVersion & { templateName: string }> {
  const t = await templateById(a, templateId);
  if (!t) throw new NotFound("not_found", "No such template.");
  const v = await templateVersion(a, t.id, version ?? t.currentVersion);
  if (!v) throw new NotFound("not_found", `The template has no version ${version}; its newest is ${t.currentVersion}.`);
  return { ...v, templateName: t.name };
}

/** The refusal for a name another template of the workspace already has (any case), at the name field. */
export function nameTaken(name: string): Conflict {
  return new Conflict(
    "template_name_taken",
    `A template called “${name}” already exists in this workspace. Choose another name, or save a new version of that one.`,
    { name },
    "name",
  );
}

/** Run a write that sets a template's name; the unique index's refusal becomes `nameTaken`. */
async function naming<T>(name: string, write: () => Promise<T>): Promise<T> {
  try {
    return await write();
  } catch (err) {
    if (isUniqueViolation(err, TEMPLATE_NAME_KEY)) throw nameTaken(name);
    throw err;
  }
}

async function writable(tx: Tx, actor: Actor, id: string) {
  const t = await lockTemplate(tx, actor, id);
  if (!t) throw new NotFound("not_found", "No such template.");
  if (!t.workspaceId) throw new Conflict("starter_read_only", "Starter templates cannot be changed: duplicate it, then edit the copy.");
  return t;
}

/** Logos come with the paid plans. */
async function checkPlan(actor: Actor, body: TemplateBody) {
  if (!body.options.marks.logo) return;
  const b = await billingOf(actor);
  if (!b.effective.logos)
    throw new PlanLimit(
      "plan_limit",
      `Logos on templates come with the Workshop and Farm plans; this workspace is on ${b.effective.name}. An owner can upgrade ` +
        `under Settings → Billing.`,
      undefined,
      "options.marks.logo",
    );
}

export async function createTemplate(
  actor: Actor,
  input: { name: string; description?: string; body: unknown; note?: string },
): Promise<{ id: string; versionId: string }> {
  const body = checkBody(input.body);
  await checkPlan(actor, body);
  const name = input.name.trim();
  const out = await transaction(async (tx) => {
    const t = await naming(name, () =>
      insertTemplate(tx, actor, { name, description: input.description?.trim() ?? "", createdBy: actor.userId }),
    );
    const v = await insertTemplateVersion(tx, t.id, {
      version: 1,
      options: body.options as Record<string, unknown>,
      variables: body.variables,
      note: input.note ?? null,
      changes: describeChanges(null, body),
      createdBy: actor.userId,
    });
    await audit(
      {
        workspaceId: actor.workspaceId,
        actorUserId: actor.userId,
        actorApiKeyId: actor.apiKeyId,
        actorEmail: actor.email,
        action: "template_created",
        target: t.id,
        details: { name: t.name },
      },
      tx,
    );
    return { id: t.id, versionId: v.id };
  });
  await enqueueThumbnail(out.versionId);
  return out;
}

export async function saveVersion(
  actor: Actor,
  id: string,
  input: { body: unknown; note?: string; restoredFrom?: number },
): Promise<{ version: number; versionId: string }> {
  const body = checkBody(input.body);
  await checkPlan(actor, body);
  const out = await transaction(async (tx) => {
    const t = await writable(tx, actor, id);
    const prev = await templateVersion(actor, id, t.currentVersion, { tx });
    const version = t.currentVersion + 1;
    const changes = describeChanges(
      prev ? { options: prev.options as SlabOptionsInput, variables: prev.variables as TemplateVariableDef[] } : null,
      body,
    );
    const v = await insertTemplateVersion(tx, id, {
      version,
      options: body.options as Record<string, unknown>,
      variables: body.variables,
      note: input.note ?? (input.restoredFrom ? `restored from version ${input.restoredFrom}` : null),
      changes,
      createdBy: actor.userId,
    });
    await setCurrentVersion(tx, actor, id, version);
    await audit(
      {
        workspaceId: actor.workspaceId,
        actorUserId: actor.userId,
        actorApiKeyId: actor.apiKeyId,
        actorEmail: actor.email,
        action: input.restoredFrom ? "template_version_restored" : "template_version_saved",
        target: id,
        details: { version, ...(input.restoredFrom ? { restoredFrom: input.restoredFrom } : {}) },
      },
      tx,
    );
    return { version, versionId: v.id };
  });
  await enqueueThumbnail(out.versionId);
  return out;
}

export async function restoreVersion(actor: Actor, id: string, version: number) {
  const { versions } = await getTemplate(actor, id);
  const old = versions.find((v) => v.version === version);
  if (!old) throw new NotFound("not_found", `The template has no version ${version}.`);
  return saveVersion(actor, id, { body: { options: old.options, variables: old.variables }, restoredFrom: version });
}

/** Copies are named "<name> (copy)", then "(copy 2)", "(copy 3)" … while a name is taken. */
const COPY_NAMES = 20;

export async function duplicateTemplate(actor: Actor, id: string): Promise<{ id: string; versionId: string }> {
  const { template, current } = await getTemplate(actor, id);
  let out: { id: string; versionId: string } | undefined;
  for (let n = 1; !out; n++) {
    const name = `${template.name} (copy${n > 1 ? ` ${n}` : ""})`;
    try {
      out = await createTemplate(actor, {
        name,
        description: template.description,
        body: { options: current.options, variables: current.variables },
        note: `copied from ${template.name}, version ${current.version}`,
      });
    } catch (err) {
      if (!(err instanceof Conflict && err.code === "template_name_taken") || n >= COPY_NAMES) throw err;
    }
  }
  await audit({
    workspaceId: actor.workspaceId,
    actorUserId: actor.userId,
    actorApiKeyId: actor.apiKeyId,
    actorEmail: actor.email,
    action: "template_duplicated",
    target: out.id,
    details: { from: id },
  });
  return out;
}

export async function setArchived(actor: Actor, id: string, archived: boolean) {
  await transaction(async (tx) => {
    await writable(tx, actor, id);
    await setTemplateArchived(tx, actor, id, archived);
    await audit(
      {
        workspaceId: actor.workspaceId,
        actorUserId: actor.userId,
        actorApiKeyId: actor.apiKeyId,
        actorEmail: actor.email,
        action: archived ? "template_archived" : "template_unarchived",
        target: id,
      },
      tx,
    );
  });
}

export async function renameTemplate(actor: Actor, id: string, name: string, description: string) {
  await transaction(async (tx) => {
    await writable(tx, actor, id);
    await naming(name.trim(), () => setTemplateName(tx, actor, id, name.trim(), description.trim()));
    await audit(
      {
        workspaceId: actor.workspaceId,
        actorUserId: actor.userId,
        actorApiKeyId: actor.apiKeyId,
        actorEmail: actor.email,
        action: "template_renamed",
        target: id,
        details: { name },
      },
      tx,
    );
  });
}
