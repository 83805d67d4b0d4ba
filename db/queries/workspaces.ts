import { and, asc, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { memberships, users, workspaces, type Role } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { Tx } from "./tx";

/**
 * Workspaces and their memberships, within the actor's workspace; the lookups that make an actor
 * (a person's workspaces, their role in one) take the person. The worker reads the webhook secret
 * through here when it signs a delivery, so no server-only import.
 */

/** The workspaces a person is a member of, by name, with their role in each. */
export async function workspacesOf(userId: string) {
  return db()
    .select({ id: workspaces.id, name: workspaces.name, slug: workspaces.slug, role: memberships.role })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(workspaces.name));
}

/** A person's role in one workspace, or null when not a member. */
export async function roleOf(workspaceId: string, userId: string): Promise<Role | null> {
  const [row] = await db()
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)))
    .limit(1);
  return row?.role ?? null;
}

export async function slugTaken(tx: Tx, slug: string): Promise<boolean> {
  const [taken] = await tx.select({ id: workspaces.id }).from(workspaces).where(eq(workspaces.slug, slug));
  return Boolean(taken);
}

/** A new workspace; its id. */
export async function insertWorkspace(tx: Tx, name: string, slug: string): Promise<string> {
  const [ws] = await tx.insert(workspaces).values({ name, slug }).returning({ id: workspaces.id });
  return ws!.id;
}

/** Make a person a member of the actor's workspace (`ifAbsent`: a member already keeps their role). */
export async function insertMembership(
  tx: Tx,
  actor: WorkspaceActor,
  userId: string,
  role: Role,
  opts: { ifAbsent?: boolean } = {},
): Promise<void> {
  const q = tx.insert(memberships).values({ workspaceId: actor.workspaceId, userId, role });
  await (opts.ifAbsent ? q.onConflictDoNothing() : q);
}

/** The workspace's members by address, with their role and since when. */
export async function memberRows(actor: WorkspaceActor) {
  return db()
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workspaceId, actor.workspaceId))
    .orderBy(asc(users.email));
}

/** The workspace's memberships, locked for the caller's transaction (so two owners cannot demote each other at once). */
export async function lockMemberships(tx: Tx, actor: WorkspaceActor): Promise<{ user_id: string; role: Role }[]> {
  const rows = await tx.execute<{ user_id: string; role: Role }>(
    sql`select user_id, role from memberships where workspace_id = ${actor.workspaceId} for update`,
  );
  return rows.rows;
}

export async function setMemberRole(tx: Tx, actor: WorkspaceActor, userId: string, role: Role): Promise<void> {
  await tx
    .update(memberships)
    .set({ role })
    .where(and(eq(memberships.workspaceId, actor.workspaceId), eq(memberships.userId, userId)));
}

export async function deleteMembership(tx: Tx, actor: WorkspaceActor, userId: string): Promise<void> {
  await tx.delete(memberships).where(and(eq(memberships.workspaceId, actor.workspaceId), eq(memberships.userId, userId)));
}

/** Whether the person with this address is a member of the actor's workspace. */
export async function isMemberByEmail(tx: Tx, actor: WorkspaceActor, email: string): Promise<boolean> {
  const [member] = await tx
    .select({ id: users.id })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.workspaceId, actor.workspaceId), eq(users.email, email)));
  return Boolean(member);
}

/** The workspace's webhook signing secret, or null before the first is made. */
export async function webhookSecretOf(actor: WorkspaceActor): Promise<string | null> {
  const [ws] = await db().select({ secret: workspaces.webhookSecret }).from(workspaces).where(eq(workspaces.id, actor.workspaceId));
  return ws?.secret ?? null;
}

export async function setWebhookSecret(actor: WorkspaceActor, secret: string): Promise<void> {
  await db().update(workspaces).set({ webhookSecret: secret }).where(eq(workspaces.id, actor.workspaceId));
}
