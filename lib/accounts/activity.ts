import "server-only";
import { auditPage } from "@/db/queries/audit";
import { outboxRows } from "@/db/queries/outbox";
import type { Caller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";

/** What a workspace's members may read of its activity: the audit log and the demo outbox. */

export const AUDIT_PAGE_SIZE = 25;

/** This workspace's events, and account events (sign-ins) of its current members. */
export async function listAudit(caller: Caller, page: number) {
  const { rows, total } = await auditPage(caller, { limit: AUDIT_PAGE_SIZE, offset: Math.max(0, page - 1) * AUDIT_PAGE_SIZE });
  return { rows, total, pages: Math.max(1, Math.ceil(total / AUDIT_PAGE_SIZE)) };
}

/**
 * The demo outbox, as one member may see it: mail addressed to the viewer, and mail sent for the
 * viewer's workspace (its invitations, notes to its plates' makers). Another person's sign-in, reset
 * or sign-up links are never shown, not even a count — not even a fellow member's, since a member of
 * two workspaces would otherwise hand their account to the other workspace's owners.
 */
export async function listOutbox(caller: Caller, limit = 50) {
  // The workspace's own mail is for the people who manage it.
  return outboxRows(caller, { address: caller.user.email, workspaceMail: can(caller.role, "members:manage"), limit });
}
