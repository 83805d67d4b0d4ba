import "server-only";
import { and, asc, count, desc, eq, gt, inArray, isNull, lt, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { apiKeys, auditEvents, devOutbox, invitations, memberships, passwordResets, pendingSignUps, revokedSessions, users, workspaces, type ApiKeyScope, type Role } from "@/db/schema";
import { generateApiKey } from "@/lib/auth/api-keys";
import { rateLimited } from "@/lib/auth/errors";
import { can } from "@/lib/auth/permissions";
import { type Caller, type SessionUser } from "@/lib/auth/guards";
import { hashPassword, verifyPassword } from "@/lib/auth/password";
import { hit } from "@/lib/auth/rate-limit";
import { hashToken, newToken } from "@/lib/auth/tokens";
import { audit } from "@/lib/audit";
import { appUrl, linkMessage, linksMessage, sendMail } from "@/lib/mail";
import { NotFound, Conflict, Invalid, Unavailable } from "@/lib/errors";

export const INVITATION_DAYS = 7;
export const RESET_MINUTES = 30;

// ---------------------------------------------------------------- people and workspaces

/** Sign-up links work for a day, once. */
export const SIGN_UP_HOURS = 24;

export type SignUpRequest = { name: string; email: string; password: string; workshop?: string; next?: string };

/**
 * Sign-up never creates or changes an account by itself: for a new address it keeps the request and
 * mails a link that finishes it; for an address that already has an account it mails that address
 * how to sign in or reset, and changes nothing. Both paths hash the password and send one mail, so
 * the answer and its timing say nothing about who has an account.
 */
export async function requestSignUp(input: SignUpRequest, ip: string): Promise<void> {
  const passwordHash = await hashPassword(input.password);
  const perAddress = await hit("mailsPerAddress", input.email);
  const [existing] = await db().select({ id: users.id }).from(users).where(eq(users.email, input.email));
  if (!perAddress.ok) return; // the same answer; the address has had enough mail for now
  if (existing) {
    await audit({ action: "sign_up_existing_address", actorUserId: existing.id, actorEmail: input.email, ip });
    await sendMail(
      linksMessage(
        input.email,
        "Someone tried to create a Slabwright account with your address",
        "Someone (perhaps you) tried to create a new Slabwright account with this e-mail address, which already has one. Nothing was changed and nobody was signed in.",
        [
          { action: "Sign in", url: appUrl("/sign-in") },
          { action: "Choose a password (forgotten, or never set one)", url: appUrl("/reset-password") },
        ],
        "If it was not you, you need do nothing: your account stays as it is.",
      ),
    );
    return;
  }
  const { token, hash } = newToken();
  await db().transaction(async (tx) => {
    // A newer request for the same address replaces the older one.
    await tx.update(pendingSignUps).set({ usedAt: new Date() }).where(and(eq(pendingSignUps.email, input.email), isNull(pendingSignUps.usedAt)));
    await tx.insert(pendingSignUps).values({
      email: input.email,
      name: input.name,
      passwordHash,
      workshop: input.workshop ?? null,
      next: input.next ?? null,
      tokenHash: hash,
      expiresAt: new Date(Date.now() + SIGN_UP_HOURS * 3600_000),
    });
    await audit({ action: "sign_up_requested", actorEmail: input.email, ip }, tx);
  });
  await sendMail(
    linkMessage(
      input.email,
      "Finish creating your Slabwright account",
      `Someone (we hope you) asked to create a Slabwright account for this address, as ${input.name}.`,
      "Finish creating the account",
      appUrl(`/sign-up/confirm/${token}`),
      `The link works once, for ${SIGN_UP_HOURS} hours. If you did not ask for it, ignore this message and no account is made.`,
    ),
  );
}

export type SignUpLinkState = "valid" | "expired" | "used" | "unknown";

export const SIGN_UP_LINK_MESSAGES: Record<Exclude<SignUpLinkState, "valid">, string> = {
  unknown: "This link is not valid. Check that you opened the whole link from the e-mail.",
  expired: "This link has expired. Sign up again to get a new one.",
  used: "This link has already been used. Sign in with your e-mail and password.",
};

/** What a sign-up link stands for, without using it. */
export async function pendingSignUpByToken(token: string): Promise<{ state: SignUpLinkState; email: string | null; next: string | null }> {
  const [row] = await db().select().from(pendingSignUps).where(eq(pendingSignUps.tokenHash, hashToken(token)));
  if (!row) return { state: "unknown", email: null, next: null };
  const state: SignUpLinkState = row.usedAt ? "used" : row.expiresAt.getTime() < Date.now() ? "expired" : "valid";
  return { state, email: row.email, next: row.next };
}

/**
 * Use a sign-up link: the account is made now, with the name, password and workshop given at
 * sign-up, its address proven by the link. If someone made an account for the address meanwhile
 * (by an e-mailed sign-in link), the link may give it its first password, never replace one.
 */
export async function finishSignUp(token: string, ip: string): Promise<SessionUser & { sessionVersion: number }> {
  return db().transaction(async (tx) => {
    const res = await tx.execute<{ id: string; email: string; name: string; password_hash: string; workshop: string | null; expires_at: Date; used_at: Date | null }>(
      sql`select id, email, name, password_hash, workshop, expires_at, used_at from pending_sign_ups where token_hash = ${hashToken(token)} for update`,
    );
    const p = res.rows[0];
    if (!p) throw new Invalid("sign_up_unknown", SIGN_UP_LINK_MESSAGES.unknown);
    if (p.used_at) throw new Conflict("sign_up_used", SIGN_UP_LINK_MESSAGES.used);
    if (new Date(p.expires_at).getTime() < Date.now()) throw new Invalid("sign_up_expired", SIGN_UP_LINK_MESSAGES.expired);
    await tx.update(pendingSignUps).set({ usedAt: new Date() }).where(eq(pendingSignUps.id, p.id));
    const [existing] = await tx.select().from(users).where(eq(users.email, p.email)).for("update");
    let user: typeof users.$inferSelect;
    if (existing) {
      [user] = await tx
        .update(users)
        .set({ passwordHash: existing.passwordHash ?? p.password_hash, name: existing.name ?? p.name, emailVerified: existing.emailVerified ?? new Date(), updatedAt: new Date() })
        .where(eq(users.id, existing.id))
        .returning() as [typeof users.$inferSelect];
    } else {
      [user] = (await tx.insert(users).values({ email: p.email, name: p.name, passwordHash: p.password_hash, emailVerified: new Date() }).returning()) as [typeof users.$inferSelect];
    }
    await audit({ action: "sign_up", actorUserId: user.id, actorEmail: p.email, ip }, tx);
    if (p.workshop && !existing) await createWorkspaceIn(tx, user.id, p.workshop);
    return { id: user.id, email: user.email, name: user.name, sessionVersion: user.sessionVersion };
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
    if (!target) throw new NotFound("not_found", "That person is not a member of this workspace.");
    if (target.role === role) return;
    if (target.role === "owner" && rows.rows.filter((r) => r.role === "owner").length === 1) {
      throw new Conflict("last_owner", "This is the workspace's only owner. Make someone else an owner first.");
    }
    await tx.update(memberships).set({ role }).where(and(eq(memberships.workspaceId, caller.workspace.id), eq(memberships.userId, userId)));
    await audit({ workspaceId: caller.workspace.id, actorUserId: caller.user.id, action: "role_changed", target: userId, details: { from: target.role, to: role } }, tx);
  });
}

export async function removeMember(caller: Caller, userId: string): Promise<void> {
  await db().transaction(async (tx) => {
    const rows = await tx.execute<{ user_id: string; role: Role }>(sql`select user_id, role from memberships where workspace_id = ${caller.workspace.id} for update`);
    const target = rows.rows.find((r) => r.user_id === userId);
    if (!target) throw new NotFound("not_found", "That person is not a member of this workspace.");
    if (target.role === "owner" && rows.rows.filter((r) => r.role === "owner").length === 1) {
      throw new Conflict("last_owner", "This is the workspace's only owner and cannot be removed.");
    }
    await tx.delete(memberships).where(and(eq(memberships.workspaceId, caller.workspace.id), eq(memberships.userId, userId)));
    await audit({ workspaceId: caller.workspace.id, actorUserId: caller.user.id, action: "member_removed", target: userId, details: { role: target.role } }, tx);
  });
}

// ---------------------------------------------------------------- invitations

export async function inviteMember(caller: Caller, email: string, role: Role): Promise<{ id: string }> {
  const limit = await hit("invitationsPerWorkspace", caller.workspace.id);
  if (!limit.ok) throw rateLimited(limit.retryAfter, "invitations from this workspace");
  const { token, hash } = newToken();
  const id = await db().transaction(async (tx) => {
    const [member] = await tx
      .select({ id: users.id })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.workspaceId, caller.workspace.id), eq(users.email, email)));
    if (member) throw new Conflict("already_member", "That person is already a member.", undefined, "email");
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
    await sendMail({
      workspaceId: caller.workspace.id,
      ...linkMessage(
        email,
        `${caller.user.name ?? caller.user.email} invited you to ${caller.workspace.name} on Slabwright`,
        `${caller.user.name ?? caller.user.email} invited you to join ${caller.workspace.name} on Slabwright as ${role === "owner" ? "an owner" : `a ${role}`}.`,
        "Accept the invitation",
        appUrl(`/invite/${token}`),
        `The link works once and expires in ${INVITATION_DAYS} days.`,
      ),
    });
  } catch (err) {
    // Without the message the invitation is useless: take it back rather than leave it half-done.
    await db().update(invitations).set({ revokedAt: new Date() }).where(eq(invitations.id, id));
    console.error("[mail] invitation not sent", err);
    throw new Unavailable("mail_failed", "The invitation e-mail could not be sent, so no invitation was made. Try again later.");
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
    if (!res[0]) throw new NotFound("not_found", "No such pending invitation.");
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
    if (!inv) throw new Invalid("invitation_unknown", INVITATION_MESSAGES.unknown);
    if (inv.accepted_at) throw new Conflict("invitation_used", INVITATION_MESSAGES.used);
    if (inv.revoked_at) throw new Invalid("invitation_revoked", INVITATION_MESSAGES.revoked);
    if (new Date(inv.expires_at).getTime() < Date.now()) throw new Invalid("invitation_expired", INVITATION_MESSAGES.expired);
    if (inv.email.toLowerCase() !== user.email.toLowerCase()) {
      throw new Invalid("invitation_other_email", `This invitation was sent to ${inv.email}; you are signed in as ${user.email}. Sign in with the invited address.`);
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
  const limit = await hit("passwordResetsPerAccount", email);
  if (!limit.ok) return;
  const [user] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
  if (!user) {
    // One mail either way, so the time the form takes says nothing about who has an account.
    await sendMail(
      linkMessage(email, "About your Slabwright password", "Someone (we hope you) asked to reset the Slabwright password for this address, but no account uses it. Perhaps you signed up with another address?", "Create an account", appUrl("/sign-up"), "If you did not ask, ignore this message."),
    );
    return;
  }
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
    if (!row || row.email.toLowerCase() !== email.toLowerCase()) throw new Invalid("reset_invalid", "This reset link is not valid for that address. Ask for a new one.");
    if (row.used_at) throw new Conflict("reset_used", "This reset link has already been used. Ask for a new one.");
    if (new Date(row.expires_at).getTime() < Date.now()) throw new Invalid("reset_expired", "This reset link has expired. Ask for a new one.");
    // A new password ends every session the account had (whoever held them).
    await tx.update(users).set({ passwordHash, sessionVersion: sql`${users.sessionVersion} + 1`, emailVerified: sql`coalesce(${users.emailVerified}, now())`, updatedAt: new Date() }).where(eq(users.id, row.user_id));
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
    if (!res[0]) throw new NotFound("not_found", "No such active key.");
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

/**
 * The demo outbox, as one member may see it: mail addressed to the viewer, and mail sent for the
 * viewer's workspace (its invitations, notes to its plates' makers). Another person's sign-in, reset
 * or sign-up links are never shown, not even a count — not even a fellow member's, since a member of
 * two workspaces would otherwise hand their account to the other workspace's owners.
 */
export async function listOutbox(caller: Caller, limit = 50) {
  const mine = sql`${caller.user.email.toLowerCase()} = any(string_to_array(${devOutbox.toAddresses}, ', '))`;
  // The workspace's own mail is for the people who manage it.
  const where = can(caller.role, "members:manage") ? or(eq(devOutbox.workspaceId, caller.workspace.id), mine) : mine;
  return db()
    .select()
    .from(devOutbox)
    .where(where)
    .orderBy(desc(devOutbox.receivedAt))
    .limit(limit);
}

// ---------------------------------------------------------------- sessions

/** End every session of a person (sign out everywhere): tokens issued before now stop working. */
export async function endAllSessions(userId: string, ip: string): Promise<void> {
  await db().transaction(async (tx) => {
    await tx.update(users).set({ sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() }).where(eq(users.id, userId));
    await audit({ action: "signed_out_everywhere", actorUserId: userId, ip }, tx);
  });
}

/**
 * Change a password, knowing the present one. Every other session ends; the caller signs in again
 * with the new password to keep this one.
 */
export async function changePassword(user: SessionUser, current: string, password: string, ip: string): Promise<void> {
  if (password.trim().toLowerCase() === user.email.toLowerCase()) throw new Invalid("invalid", "Your password must not be your e-mail address.", undefined, "password");
  const [row] = await db().select({ hash: users.passwordHash }).from(users).where(eq(users.id, user.id));
  if (!row?.hash) throw new Invalid("no_password", "This account signs in by e-mailed link and has no password yet: choose one through “Forgot your password?” on the sign-in page.", undefined, "current");
  if (!(await verifyPassword(current, row.hash))) throw new Invalid("wrong_password", "That is not your present password.", undefined, "current");
  const passwordHash = await hashPassword(password);
  await db().transaction(async (tx) => {
    await tx.update(users).set({ passwordHash, sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() }).where(eq(users.id, user.id));
    await audit({ action: "password_changed", actorUserId: user.id, actorEmail: user.email, ip }, tx);
  });
}

/** End one session (signing out): kept until the token would have expired on its own. */
export async function revokeSession(sid: string, userId: string | null, expiresAt: Date): Promise<void> {
  await db().insert(revokedSessions).values({ sid, userId, expiresAt }).onConflictDoNothing();
  await db().delete(revokedSessions).where(lt(revokedSessions.expiresAt, new Date()));
}

/** Whether a session token is still good: its person exists, its version is current and it was not signed out. */
export async function sessionStillValid(userId: string, version: number, sid: string): Promise<boolean> {
  const res = await db().execute<{ ok: boolean }>(
    sql`select (u.session_version = ${version} and not exists (select 1 from revoked_sessions r where r.sid = ${sid})) as ok from users u where u.id = ${userId}`,
  );
  return res.rows[0]?.ok === true;
}
