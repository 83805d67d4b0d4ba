import "server-only";
import type { Role } from "@/db/schema";
import {
  insertInvitation,
  invitationByTokenHash,
  lockInvitationByTokenHash,
  markInvitationAccepted,
  pendingInvitationFor,
  pendingInvitationRows,
  reinstateInvitation,
  revokeInvitationRow,
  revokePendingInvitations,
  withdrawInvitation,
} from "@/db/queries/invitations";
import { transaction } from "@/db/queries/tx";
import type { SessionUser } from "@/db/queries/users";
import { insertMembership, isMemberByEmail } from "@/db/queries/workspaces";
import { systemActor, type WorkspaceActor } from "@/lib/auth/actor";
import { rateLimited } from "@/lib/auth/errors";
import type { Caller } from "@/lib/auth/guards";
import { hit } from "@/lib/auth/rate-limit";
import { hashToken, newToken } from "@/lib/auth/tokens";
import { audit } from "@/lib/audit";
import { Conflict, Invalid, NotFound, Unavailable } from "@/lib/errors";
import { aOrAn, day } from "@/lib/format";
import { sendMail } from "@/lib/mail";
import { invitationMessage } from "./mail";

export const INVITATION_DAYS = 7;

/** The refusal of a second invitation to an address one is already waiting for: said at the e-mail field. */
function alreadyWaiting(email: string, waiting: { role: Role; createdAt: Date }, role: Role): Conflict {
  const as = waiting.role === role ? "" : `, as ${aOrAn(waiting.role)}`;
  return new Conflict(
    "invitation_pending",
    `An invitation to ${email} is already waiting, sent ${day(waiting.createdAt)}${as}. Send it again, or withdraw it first to ` +
      `invite with another role.`,
    { sentAt: waiting.createdAt.toISOString(), role: waiting.role },
    "email",
  );
}

/**
 * Invite someone by address: a link mailed to them. A member already is refused, and so is an
 * address an invitation is still waiting for (nothing is mailed: `resendInvitation` sends it again).
 */
export async function inviteMember(caller: Caller, email: string, role: Role): Promise<{ id: string }> {
  const waiting = await pendingInvitationFor(caller, email);
  if (waiting) throw alreadyWaiting(email, waiting, role);
  const limit = await hit("invitationsPerWorkspace", caller.workspaceId);
  if (!limit.ok) throw rateLimited(limit.retryAfter, "invitations from this workspace");
  const { token, hash } = newToken();
  const id = await transaction(async (tx) => {
    if (await isMemberByEmail(tx, caller, email))
      throw new Conflict("already_member", "That person is already a member.", undefined, "email");
    // One invitation per address: one that expired, or came in at the same moment, is replaced.
    await revokePendingInvitations(tx, caller, email);
    const id = await insertInvitation(tx, caller, {
      email,
      role,
      tokenHash: hash,
      invitedBy: caller.userId,
      expiresAt: new Date(Date.now() + INVITATION_DAYS * 86400_000),
    });
    await audit(
      { workspaceId: caller.workspaceId, actorUserId: caller.userId, action: "invitation_sent", target: email, details: { role } },
      tx,
    );
    return id;
  });
  await mailInvitation(caller, { email, role, token }, async () => {
    // Without the message the invitation is useless: take it back rather than leave it half-done.
    await withdrawInvitation(caller, id);
    return "The invitation e-mail could not be sent, so no invitation was made. Try again later.";
  });
  return { id };
}

/**
 * Send the invitation waiting for an address again: the same address and role, a new link (the old
 * one stops working) and a new expiry. It replaces the waiting row, so "sent" is when it last went
 * out. Limited like new invitations, and audit-logged.
 */
export async function resendInvitation(caller: Caller, email: string): Promise<{ id: string }> {
  const limit = await hit("invitationsPerWorkspace", caller.workspaceId);
  if (!limit.ok) throw rateLimited(limit.retryAfter, "invitations from this workspace");
  const { token, hash } = newToken();
  const { id, previous, role } = await transaction(async (tx) => {
    const waiting = await pendingInvitationFor(caller, email, { tx });
    if (!waiting) throw new NotFound("not_found", `No invitation to ${email} is waiting any more: send a new one.`, undefined, "email");
    await revokePendingInvitations(tx, caller, email);
    const id = await insertInvitation(tx, caller, {
      email,
      role: waiting.role,
      tokenHash: hash,
      invitedBy: caller.userId,
      expiresAt: new Date(Date.now() + INVITATION_DAYS * 86400_000),
    });
    await audit(
      {
        workspaceId: caller.workspaceId,
        actorUserId: caller.userId,
        action: "invitation_resent",
        target: email,
        details: { role: waiting.role, firstSent: waiting.createdAt.toISOString() },
      },
      tx,
    );
    return { id, previous: waiting.id, role: waiting.role };
  });
  await mailInvitation(caller, { email, role, token }, async () => {
    // The earlier link still reaches its mailbox: keep it open rather than leave the address with none.
    await withdrawInvitation(caller, id);
    await reinstateInvitation(caller, previous);
    return "The invitation e-mail could not be sent again; the earlier invitation still stands. Try again later.";
  });
  return { id };
}

async function mailInvitation(caller: Caller, inv: { email: string; role: Role; token: string }, undo: () => Promise<string>) {
  try {
    await sendMail(
      invitationMessage(
        { ...inv, days: INVITATION_DAYS },
        { inviter: caller.user.name ?? caller.user.email, workspaceId: caller.workspace.id, workspaceName: caller.workspace.name },
      ),
    );
  } catch (err) {
    console.error("[mail] invitation not sent", err);
    throw new Unavailable("mail_failed", await undo());
  }
}

export async function listPendingInvitations(actor: WorkspaceActor) {
  return pendingInvitationRows(actor);
}

export async function revokeInvitation(actor: WorkspaceActor, id: string): Promise<void> {
  await transaction(async (tx) => {
    const email = await revokeInvitationRow(tx, actor, id);
    if (!email) throw new NotFound("not_found", "No such pending invitation.");
    await audit({ workspaceId: actor.workspaceId, actorUserId: actor.userId, action: "invitation_revoked", target: email }, tx);
  });
}

export type InvitationState = "valid" | "expired" | "used" | "revoked" | "unknown";

export async function invitationByToken(token: string) {
  const row = await invitationByTokenHash(hashToken(token));
  if (!row) return { state: "unknown" as InvitationState, invitation: null };
  const state: InvitationState = row.acceptedAt
    ? "used"
    : row.revokedAt
      ? "revoked"
      : row.expiresAt.getTime() < Date.now()
        ? "expired"
        : "valid";
  return { state, invitation: row };
}

/** What the page an invitation link opens says when the link cannot be used. */
export const INVITATION_MESSAGES: Record<Exclude<InvitationState, "valid">, string> = {
  unknown: "This invitation link is not valid. Check that you opened the whole link from the e-mail.",
  expired: "This invitation has expired. Ask the workspace's owner to send a new one.",
  used: "This invitation has already been used. Sign in to reach the workspace.",
  revoked: "This invitation was withdrawn. Ask the workspace's owner to send a new one.",
};

/** Accept an invitation: single use, not after it expires, and only by the person it was sent to. */
export async function acceptInvitation(user: SessionUser, token: string): Promise<{ workspaceId: string }> {
  return transaction(async (tx) => {
    const inv = await lockInvitationByTokenHash(tx, hashToken(token));
    if (!inv) throw new Invalid("invitation_unknown", INVITATION_MESSAGES.unknown);
    if (inv.accepted_at) throw new Conflict("invitation_used", INVITATION_MESSAGES.used);
    if (inv.revoked_at) throw new Invalid("invitation_revoked", INVITATION_MESSAGES.revoked);
    if (new Date(inv.expires_at).getTime() < Date.now()) throw new Invalid("invitation_expired", INVITATION_MESSAGES.expired);
    if (inv.email.toLowerCase() !== user.email.toLowerCase()) {
      throw new Invalid(
        "invitation_other_email",
        `This invitation was sent to ${inv.email}; you are signed in as ${user.email}. Sign in with the invited address.`,
      );
    }
    // The invitee is not a member yet: the system adds them to the workspace the invitation names.
    const ws = systemActor(inv.workspace_id);
    await insertMembership(tx, ws, user.id, inv.role, { ifAbsent: true });
    await markInvitationAccepted(tx, ws, inv.id, user.id);
    await audit(
      {
        workspaceId: inv.workspace_id,
        actorUserId: user.id,
        action: "invitation_accepted",
        target: inv.email,
        details: { role: inv.role },
      },
      tx,
    );
    return { workspaceId: inv.workspace_id };
  });
}
