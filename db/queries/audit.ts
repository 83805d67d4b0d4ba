import "server-only";
import { and, count, desc, eq, inArray, isNull, or } from "drizzle-orm";
import { db } from "@/db";
import { apiKeys, auditEvents, memberships, users } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { Tx } from "./tx";

/** The audit log: events written (each naming its own workspace, or none for account events) and read per workspace. */

export type AuditValues = Omit<typeof auditEvents.$inferInsert, "id" | "createdAt">;

/** Record an event, inside the caller's transaction when it has one. */
export async function insertAuditEvent(entry: AuditValues, tx?: Tx): Promise<void> {
  await (tx ?? db()).insert(auditEvents).values(entry);
}

/** The workspace's events, and account events (sign-ins) of its current members: one page, newest first, and the total. */
export async function auditPage(actor: WorkspaceActor, page: { limit: number; offset: number }) {
  const memberIds = db().select({ id: memberships.userId }).from(memberships).where(eq(memberships.workspaceId, actor.workspaceId));
  const memberEmails = db()
    .select({ email: users.email })
    .from(users)
    .innerJoin(memberships, eq(memberships.userId, users.id))
    .where(eq(memberships.workspaceId, actor.workspaceId));
  const where = or(
    eq(auditEvents.workspaceId, actor.workspaceId),
    and(isNull(auditEvents.workspaceId), or(inArray(auditEvents.actorUserId, memberIds), inArray(auditEvents.actorEmail, memberEmails))),
  );
  const [total] = await db().select({ n: count() }).from(auditEvents).where(where);
  const rows = await db()
    .select({
      id: auditEvents.id,
      action: auditEvents.action,
      target: auditEvents.target,
      ip: auditEvents.ip,
      details: auditEvents.details,
      createdAt: auditEvents.createdAt,
      actorEmail: auditEvents.actorEmail,
      actorName: users.name,
      actorUserEmail: users.email,
      actorKeyName: apiKeys.name,
      actorKeyPrefix: apiKeys.prefix,
    })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorUserId))
    .leftJoin(apiKeys, eq(apiKeys.id, auditEvents.actorApiKeyId))
    .where(where)
    .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
    .limit(page.limit)
    .offset(page.offset);
  return { rows, total: total?.n ?? 0 };
}
