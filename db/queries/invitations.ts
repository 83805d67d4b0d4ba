import "server-only";
import { and, desc, eq, gt, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { invitations, workspaces, type Role } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { Tx } from "./tx";

/**
 * Invitations to a workspace, within the actor's workspace; an invitation link is looked up by the
 * hash of its token alone (whoever holds the link is not a member yet).
 */

/** Withdraw the pending invitations of an address (a new one replaces them). */
export async function revokePendingInvitations(tx: Tx, actor: WorkspaceActor, email: string): Promise<void> {
  await tx
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(
      and(
        eq(invitations.workspaceId, actor.workspaceId),
        eq(invitations.email, email),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
      ),
    );
}

type Db = ReturnType<typeof db> | Tx;

/** The address's newest invitation still open (not accepted, withdrawn or expired), or null; locked when read in a transaction. */
export async function pendingInvitationFor(
  actor: WorkspaceActor,
  email: string,
  opts: { tx?: Tx } = {},
): Promise<{ id: string; role: Role; createdAt: Date; expiresAt: Date } | null> {
  const q = (opts.tx ?? (db() as Db))
    .select({ id: invitations.id, role: invitations.role, createdAt: invitations.createdAt, expiresAt: invitations.expiresAt })
    .from(invitations)
    .where(
      and(
        eq(invitations.workspaceId, actor.workspaceId),
        eq(invitations.email, email),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
        gt(invitations.expiresAt, new Date()),
      ),
    )
    .orderBy(desc(invitations.createdAt))
    .limit(1);
  const [row] = opts.tx ? await q.for("update") : await q;
  return row ?? null;
}

/** Open an invitation withdrawn a moment ago again (the mail that was to replace it could not be sent). */
export async function reinstateInvitation(actor: WorkspaceActor, id: string): Promise<void> {
  await db()
    .update(invitations)
    .set({ revokedAt: null })
    .where(and(eq(invitations.id, id), eq(invitations.workspaceId, actor.workspaceId), isNull(invitations.acceptedAt)));
}

/** A new invitation from the actor; its id. */
export async function insertInvitation(
  tx: Tx,
  actor: WorkspaceActor,
  values: { email: string; role: Role; tokenHash: string; invitedBy: string; expiresAt: Date },
): Promise<string> {
  const [row] = await tx
    .insert(invitations)
    .values({ workspaceId: actor.workspaceId, ...values })
    .returning({ id: invitations.id });
  return row!.id;
}

/** Take an invitation back at once (its mail could not be sent). */
export async function withdrawInvitation(actor: WorkspaceActor, id: string): Promise<void> {
  await db()
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(and(eq(invitations.id, id), eq(invitations.workspaceId, actor.workspaceId)));
}

/** The workspace's invitations still open (not accepted, withdrawn or expired), newest first. */
export async function pendingInvitationRows(actor: WorkspaceActor) {
  return db()
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      createdAt: invitations.createdAt,
      expiresAt: invitations.expiresAt,
    })
    .from(invitations)
    .where(
      and(
        eq(invitations.workspaceId, actor.workspaceId),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
        gt(invitations.expiresAt, new Date()),
      ),
    )
    .orderBy(desc(invitations.createdAt));
}

/** Withdraw a pending invitation; its address, or null when there is no such pending invitation. */
export async function revokeInvitationRow(tx: Tx, actor: WorkspaceActor, id: string): Promise<string | null> {
  const res = await tx
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(
      and(
        eq(invitations.id, id),
        eq(invitations.workspaceId, actor.workspaceId),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
      ),
    )
    .returning({ email: invitations.email });
  return res[0]?.email ?? null;
}

/** The invitation a link stands for, with its workspace's name, or null. */
export async function invitationByTokenHash(tokenHash: string) {
  const [row] = await db()
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
      workspaceId: invitations.workspaceId,
      workspaceName: workspaces.name,
    })
    .from(invitations)
    .innerJoin(workspaces, eq(workspaces.id, invitations.workspaceId))
    .where(eq(invitations.tokenHash, tokenHash));
  return row ?? null;
}

export type LockedInvitation = {
  id: string;
  email: string;
  role: Role;
  workspace_id: string;
  expires_at: Date;
  accepted_at: Date | null;
  revoked_at: Date | null;
};

/** The invitation a link stands for, locked for the caller's transaction (it is used once), or null. */
export async function lockInvitationByTokenHash(tx: Tx, tokenHash: string): Promise<LockedInvitation | null> {
  const res = await tx.execute<LockedInvitation>(
    sql`select id, email, role, workspace_id, expires_at, accepted_at, revoked_at from invitations where token_hash = ${tokenHash} 
      for update`,
  );
  return res.rows[0] ?? null;
}

/** The invitation has been used, by `userId`. */
export async function markInvitationAccepted(tx: Tx, actor: WorkspaceActor, id: string, userId: string): Promise<void> {
  await tx
    .update(invitations)
    .set({ acceptedAt: new Date(), acceptedBy: userId })
    .where(and(eq(invitations.id, id), eq(invitations.workspaceId, actor.workspaceId)));
}
