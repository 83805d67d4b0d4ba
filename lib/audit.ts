import "server-only";
import { insertAuditEvent } from "@/db/queries/audit";
import type { Tx } from "@/db/queries/tx";

export type AuditAction =
  | "sign_in"
  | "sign_in_failed"
  | "sign_up"
  | "sign_up_requested"
  | "sign_up_existing_address"
  | "password_changed"
  | "signed_out_everywhere"
  | "password_reset_requested"
  | "password_reset"
  | "invitation_sent"
  | "invitation_resent"
  | "invitation_revoked"
  | "invitation_accepted"
  | "role_changed"
  | "member_removed"
  | "workspace_created"
  | "api_key_created"
  | "api_key_revoked"
  | "template_created"
  | "template_version_saved"
  | "template_version_restored"
  | "template_duplicated"
  | "template_archived"
  | "template_unarchived"
  | "template_renamed"
  | "checkout_started"
  | "plan_changed"
  | "billing_event";

export type AuditEntry = {
  workspaceId?: string | null;
  actorUserId?: string | null;
  actorApiKeyId?: string | null;
  actorEmail?: string | null;
  action: AuditAction;
  target?: string | null;
  ip?: string | null;
  details?: Record<string, unknown>;
};

/** Record an event, inside the caller's transaction when it has one (so the event and the change land together). */
export async function audit(entry: AuditEntry, tx?: Tx): Promise<void> {
  await insertAuditEvent(entry, tx);
}
