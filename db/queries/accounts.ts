import "server-only";
import { and, asc, count, desc, eq, gt, inArray, isNull, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { apiKeys, auditEvents, devOutbox, invitations, memberships, passwordResets, users, workspaces, type ApiKeyScope, type Role } from "@/db/schema";
import { generateApiKey } from "@/lib/auth/api-keys";
import { rateLimited } from "@/lib/auth/errors";
import { UserError, type Caller, type SessionUser } from "@/lib/auth/guards";
import { hashPassword } from "@/lib/auth/password";
import { hit, LIMITS } from "@/lib/auth/rate-limit";
import { hashToken, newToken } from "@/lib/auth/tokens";
import { audit } from "@/lib/audit";
import { appUrl, linkMessage, sendMail } from "@/lib/mail";

export const INVITATION_DAYS = 7;
export const RESET_MINUTES = 30;

// ---------------------------------------------------------------- people and workspaces

export async function signUpUser(input: { name: string; email: string; password: string; workshop?: string }, ip: string): Promise<{ userId: string }> {
  const passwordHash = await hashPassword(input.password);
  return db().transaction(async (tx) => {
    const [existing] = await tx.select({ id: users.id, passwordHash: users.passwordHash }).from(users).where(eq(users.email, input.email));
    let userId: string;
    if (existing?.passwordHash) throw new UserError("email_taken", "An account with this e-mail already exists. Sign in, or reset your password.", "email");
    if (existing) {
      // Someone who signed in by e-mailed link before sets a password now.
      await tx.update(users).set({ passwordHash, name: input.name, updatedAt: new Date() }).where(eq(users.id, existing.id));
      userId = existing.id;
    } else {
      const [row] = await tx.insert(users).values({ email: input.email, name: input.name, passwordHash }).returning({ id: users.id });
      userId = row!.id;
    }
    await audit({ action: "sign_up", actorUserId: userId, actorEmail: input.email, ip }, tx);
    if (input.workshop) await createWorkspaceIn(tx, userId, input.workshop);
    return { userId };
  });
}

type Tx = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];

async function createWorkspaceIn(tx: Tx, userId: string, name: string): Promise<string> {
  const base = name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "").slice(0, 40) || "workshop";
  let slug = base;
  for (let i = 2; ; i++) {
    const [taken] = await tx.select({ id: workspaces.id }).from(workspaces).where(eq(workspaces.slug, slug));
    if (!taken) break;
    slug = `${base}-${i}`;
  }
  const [ws] = await tx.insert(workspaces).values({ name, slug }).returning({ id: workspaces.id });
  await tx.insert(memberships).values({ workspaceId: ws!.id, userId, role: "owner" });
  await audit({ workspaceId: ws!.id, actorUserId: userId, action: "workspace_created", target: name }, tx);
  return ws!.id;
}

export async function createWorkspace(user: SessionUser, name: string): Promise<string> {
  return db().transaction((tx) => createWorkspaceIn(tx, user.id, name));
}

export async function listMembers(caller: Caller) {
  return db()
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workspaceId, caller.workspace.id))
    .orderBy(asc(users.email));
}

/**
 * Change a member's role. The workspace's memberships are locked for the transaction, so two owners
 * demoting each other at once cannot leave it with none.
 */
export async function changeRole(caller: Caller, userId: string, role: Role): Promise<void> {
  await db().transaction(async (tx) => {
    const rows = await tx.execute<{ user_id: string; role: Role }>(sql`select user_id, role from memberships where workspace_id = ${caller.workspace.id} for update`);
    const target = rows.rows.find((r) => r.user_id === userId);
    if (!target) throw new UserError("not_found", "That person is not a member of this workspace.");
    if (target.role === role) return;
    if (target.role === "owner" && rows.rows.filter((r) => r.role === "owner").length === 1) {
      throw new UserError("last_owner", "This is the workspace's only owner. Make someone else an owner first.");
    }
    await tx.update(memberships).set({ role }).where(and(eq(memberships.workspaceId, caller.workspace.id), eq(memberships.userId, userId)));
    await audit({ workspaceId: caller.workspace.id, actorUserId: caller.user.id, action: "role_changed", target: userId, details: { from: target.role, to: role } }, tx);
  });
}

export async function removeMember(caller: Caller, userId: string): Promise<void> {
  await db().transaction(async (tx) => {
    const rows = await tx.execute<{ user_id: string; role: Role }>(sql`select user_id, role from memberships where workspace_id = ${caller.workspace.id} for update`);
    const target = rows.rows.find((r) => r.user_id === userId);
    if (!target) throw new UserError("not_found", "That person is not a member of this workspace.");
    if (target.role === "owner" && rows.rows.filter((r) => r.role === "owner").length === 1) {
      throw new UserError("last_owner", "This is the workspace's only owner and cannot be removed.");
    }
    await tx.delete(memberships).where(and(eq(memberships.workspaceId, caller.workspace.id), eq(memberships.userId, userId)));
    await audit({ workspaceId: caller.workspace.id, actorUserId: caller.user.id, action: "member_removed", target: userId, details: { role: target.role } }, tx);
  });
}

// ---------------------------------------------------------------- invitations

export async function inviteMember(caller: Caller, email: string, role: Role): Promise<{ id: string }> {
  const limit = await hit(`invite:${caller.workspace.id}`, LIMITS.invitationsPerWorkspace);
  if (!limit.ok) throw rateLimited(limit.retryAfter, "invitations from this workspace");
  const { token, hash } = newToken();
  const id = await db().transaction(async (tx) => {
    const [member] = await tx
      .select({ id: users.id })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.workspaceId, caller.workspace.id), eq(users.email, email)));
    if (member) throw new UserError("already_member", "That person is already a member.", "email");
    // A new invitation replaces any earlier one still pending for the same address.
    await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.workspaceId, caller.workspace.id), eq(invitations.email, email), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
    const [row] = await tx
      .insert(invitations)
      .values({ workspaceId: caller.workspace.id, email, role, tokenHash: hash, invitedBy: caller.user.id, expiresAt: new Date(Date.now() + INVITATION_DAYS * 86400_000) })
      .returning({ id: invitations.id });
    await audit({ workspaceId: caller.workspace.id, actorUserId: caller.user.id, action: "invitation_sent", target: email, details: { role } }, tx);
    return row!.id;
  });
  try {
    await sendMail(
      linkMessage(
        email,
        `${caller.user.name ?? caller.user.email} invited you to ${caller.workspace.name} on Slabwright`,
        `${caller.user.name ?? caller.user.email} invited you to join ${caller.workspace.name} on Slabwright as ${role === "owner" ? "an owner" : `a ${role}`}.`,
        "Accept the invitation",
        appUrl(`/invite/${token}`),
        `The link works once and expires in ${INVITATION_DAYS} days.`,
      ),
    );
  } catch (err) {
    // Without the message the invitation is useless: take it back rather than leave it half-done.
    await db().update(invitations).set({ revokedAt: new Date() }).where(eq(invitations.id, id));
    console.error("[mail] invitation not sent", err);
    throw new UserError("mail_failed", "The invitation e-mail could not be sent, so no invitation was made. Try again later.");
  }
  return { id };
}

export async function listPendingInvitations(caller: Caller) {
  return db()
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, createdAt: invitations.createdAt, expiresAt: invitations.expiresAt })
    .from(invitations)
    .where(and(eq(invitations.workspaceId, caller.workspace.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())))
    .orderBy(desc(invitations.createdAt));
}

export async function revokeInvitation(caller: Caller, id: string): Promise<void> {
  await db().transaction(async (tx) => {
    const res = await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.id, id), eq(invitations.workspaceId, caller.workspace.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
      .returning({ email: invitations.email });
    if (!res[0]) throw new UserError("not_found", "No such pending invitation.");
    await audit({ workspaceId: caller.workspace.id, actorUserId: caller.user.id, action: "invitation_revoked", target: res[0].email }, tx);
  });
}

export type InvitationState = "valid" | "expired" | "used" | "revoked" | "unknown";

export async function invitationByToken(token: string) {
  const [row] = await db()
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, expiresAt: invitations.expiresAt, acceptedAt: invitations.acceptedAt, revokedAt: invitations.revokedAt, workspaceId: invitations.workspaceId, workspaceName: workspaces.name })
    .from(invitations)
    .innerJoin(workspaces, eq(workspaces.id, invitations.workspaceId))
    .where(eq(invitations.tokenHash, hashToken(token)));
  if (!row) return { state: "unknown" as InvitationState, invitation: null };
  const state: InvitationState = row.acceptedAt ? "used" : row.revokedAt ? "revoked" : row.expiresAt.getTime() < Date.now() ? "expired" : "valid";
  return { state, invitation: row };
}

export const INVITATION_MESSAGES: Record<Exclude<InvitationState, "valid">, string> = {
  unknown: "This invitation link is not valid. Check that you opened the whole link from the e-mail.",
  expired: "This invitation has expired. Ask the workspace's owner to send a new one.",
  used: "This invitation has already been used. Sign in to reach the workspace.",
  revoked: "This invitation was withdrawn. Ask the workspace's owner to send a new one.",
};

/** Accept an invitation: single use, not after it expires, and only by the person it was sent to. */
export async function acceptInvitation(user: SessionUser, token: string): Promise<{ workspaceId: string }> {
  return db().transaction(async (tx) => {
    const res = await tx.execute<{ id: string; email: string; role: Role; workspace_id: string; expires_at: Date; accepted_at: Date | null; revoked_at: Date | null }>(
      sql`select id, email, role, workspace_id, expires_at, accepted_at, revoked_at from invitations where token_hash = ${hashToken(token)} for update`,
    );
    const inv = res.rows[0];
    if (!inv) throw new UserError("invitation_unknown", INVITATION_MESSAGES.unknown);
    if (inv.accepted_at) throw new UserError("invitation_used", INVITATION_MESSAGES.used);
    if (inv.revoked_at) throw new UserError("invitation_revoked", INVITATION_MESSAGES.revoked);
    if (new Date(inv.expires_at).getTime() < Date.now()) throw new UserError("invitation_expired", INVITATION_MESSAGES.expired);
    if (inv.email.toLowerCase() !== user.email.toLowerCase()) {
      throw new UserError("invitation_other_email", `This invitation was sent to ${inv.email}; you are signed in as ${user.email}. Sign in with the invited address.`);
    }
    await tx.insert(memberships).values({ workspaceId: inv.workspace_id, userId: user.id, role: inv.role }).onConflictDoNothing();
    await tx.update(invitations).set({ acceptedAt: new Date(), acceptedBy: user.id }).where(eq(invitations.id, inv.id));
    await audit({ workspaceId: inv.workspace_id, actorUserId: user.id, action: "invitation_accepted", target: inv.email, details: { role: inv.role } }, tx);
    return { workspaceId: inv.workspace_id };
  });
}

// ---------------------------------------------------------------- password reset

/** Always the same answer whether or not the account exists, so the form tells nobody who has one. */
export async function requestPasswordReset(email: string, ip: string): Promise<void> {
  const limit = await hit(`reset:${email}`, LIMITS.passwordResetsPerAccount);
  if (!limit.ok) return;
  const [user] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
  if (!user) return;
  const { token, hash } = newToken();
  await db().transaction(async (tx) => {
    await tx.insert(passwordResets).values({ userId: user.id, tokenHash: hash, expiresAt: new Date(Date.now() + RESET_MINUTES * 60_000) });
    await audit({ action: "password_reset_requested", actorUserId: user.id, actorEmail: email, ip }, tx);
  });
  await sendMail(
    linkMessage(email, "Reset your Slabwright password", "Someone (we hope you) asked to reset the password for this address.", "Choose a new password", appUrl(`/reset-password/${token}`), `The link works once, for ${RESET_MINUTES} minutes. If you did not ask, ignore this message; your password stays as it is.`),
  );
}

export async function resetPassword(token: string, email: string, password: string, ip: string): Promise<void> {
  const passwordHash = await hashPassword(password);
  await db().transaction(async (tx) => {
    const res = await tx.execute<{ id: string; user_id: string; expires_at: Date; used_at: Date | null; email: string }>(
      sql`select r.id, r.user_id, r.expires_at, r.used_at, u.email from password_resets r join users u on u.id = r.user_id where r.token_hash = ${hashToken(token)} for update of r`,
    );
    const row = res.rows[0];
    if (!row || row.email.toLowerCase() !== email.toLowerCase()) throw new UserError("reset_invalid", "This reset link is not valid for that address. Ask for a new one.");
    if (row.used_at) throw new UserError("reset_used", "This reset link has already been used. Ask for a new one.");
    if (new Date(row.expires_at).getTime() < Date.now()) throw new UserError("reset_expired", "This reset link has expired. Ask for a new one.");
    await tx.update(users).set({ passwordHash, updatedAt: new Date() }).where(eq(users.id, row.user_id));
    await tx.update(passwordResets).set({ usedAt: new Date() }).where(eq(passwordResets.userId, row.user_id));
    await audit({ action: "password_reset", actorUserId: row.user_id, actorEmail: row.email, ip }, tx);
  });
}

// ---------------------------------------------------------------- API keys

export async function createApiKey(caller: Caller, name: string, scopes: ApiKeyScope[]): Promise<{ id: string; key: string; prefix: string }> {
  const k = generateApiKey();
  const id = await db().transaction(async (tx) => {
    const [row] = await tx.insert(apiKeys).values({ workspaceId: caller.workspace.id, name, prefix: k.prefix, keyHash: k.hash, scopes, createdBy: caller.user.id }).returning({ id: apiKeys.id });
    await audit({ workspaceId: caller.workspace.id, actorUserId: caller.user.id, action: "api_key_created", target: `${name} (swk_${k.prefix}…)`, details: { scopes } }, tx);
    return row!.id;
  });
  return { id, key: k.key, prefix: k.prefix };
}

export async function listApiKeys(caller: Caller) {
  return db()
    .select({ id: apiKeys.id, name: apiKeys.name, prefix: apiKeys.prefix, scopes: apiKeys.scopes, createdAt: apiKeys.createdAt, lastUsedAt: apiKeys.lastUsedAt, revokedAt: apiKeys.revokedAt })
    .from(apiKeys)
    .where(eq(apiKeys.workspaceId, caller.workspace.id))
    .orderBy(desc(apiKeys.createdAt));
}

export async function revokeApiKey(caller: Caller, id: string): Promise<void> {
  await db().transaction(async (tx) => {
    const res = await tx
      .update(apiKeys)
      .set({ revokedAt: new Date() })
      .where(and(eq(apiKeys.id, id), eq(apiKeys.workspaceId, caller.workspace.id), isNull(apiKeys.revokedAt)))
      .returning({ name: apiKeys.name, prefix: apiKeys.prefix });
    if (!res[0]) throw new UserError("not_found", "No such active key.");
    await audit({ workspaceId: caller.workspace.id, actorUserId: caller.user.id, action: "api_key_revoked", target: `${res[0].name} (swk_${res[0].prefix}…)` }, tx);
  });
}

// ---------------------------------------------------------------- audit and outbox

export const AUDIT_PAGE_SIZE = 25;

/** This workspace's events, and account events (sign-ins) of its current members. */
export async function listAudit(caller: Caller, page: number) {
  const memberIds = db().select({ id: memberships.userId }).from(memberships).where(eq(memberships.workspaceId, caller.workspace.id));
  const memberEmails = db().select({ email: users.email }).from(users).innerJoin(memberships, eq(memberships.userId, users.id)).where(eq(memberships.workspaceId, caller.workspace.id));
  const where = or(
    eq(auditEvents.workspaceId, caller.workspace.id),
    and(isNull(auditEvents.workspaceId), or(inArray(auditEvents.actorUserId, memberIds), inArray(auditEvents.actorEmail, memberEmails))),
  );
  const [total] = await db().select({ n: count() }).from(auditEvents).where(where);
  const rows = await db()
    .select({ id: auditEvents.id, action: auditEvents.action, target: auditEvents.target, ip: auditEvents.ip, details: auditEvents.details, createdAt: auditEvents.createdAt, actorEmail: auditEvents.actorEmail, actorName: users.name, actorUserEmail: users.email })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorUserId))
    .where(where)
    .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
    .limit(AUDIT_PAGE_SIZE)
    .offset(Math.max(0, page - 1) * AUDIT_PAGE_SIZE);
  return { rows, total: total?.n ?? 0, pages: Math.max(1, Math.ceil((total?.n ?? 0) / AUDIT_PAGE_SIZE)) };
}

export async function listOutbox(limit = 50) {
  return db().select().from(devOutbox).orderBy(desc(devOutbox.receivedAt)).limit(limit);
}
