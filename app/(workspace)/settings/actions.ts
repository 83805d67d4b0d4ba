"use server";

import { revalidatePath } from "next/cache";
import { activeApiKeyCount } from "@/db/queries/api-keys";
import { createApiKey, revokeApiKey } from "@/lib/accounts/api-keys";
import { inviteMember, resendInvitation, revokeInvitation } from "@/lib/accounts/invitations";
import { changeRole, removeMember } from "@/lib/accounts/members";
import { billingOf } from "@/lib/billing/service";
import { guardedAction } from "@/lib/auth/guards";
import { apiKeySchema, changeRoleSchema, idSchema, inviteSchema, memberSchema, resendInviteSchema } from "@/lib/validation/accounts";

export const sendInvitation = guardedAction(inviteSchema, "invitations:manage", "inviting people", async (input, caller) => {
  await inviteMember(caller, input.email, input.role);
  revalidatePath("/settings");
  return { ok: true, data: undefined, message: `Invitation sent to ${input.email}.` };
});

/** "Send again": the invitation waiting for an address, with a new link and expiry (the old link stops working). */
export const sendInvitationAgain = guardedAction(resendInviteSchema, "invitations:manage", "inviting people", async (input, caller) => {
  await resendInvitation(caller, input.email);
  revalidatePath("/settings");
  return { ok: true, data: undefined, message: `Invitation sent again to ${input.email}; the link in the earlier e-mail no longer works.` };
});

export const withdrawInvitation = guardedAction(idSchema, "invitations:manage", "withdrawing invitations", async (input, caller) => {
  await revokeInvitation(caller, input.id);
  revalidatePath("/settings");
  return { ok: true, data: undefined, message: "Invitation withdrawn." };
});

export const setMemberRole = guardedAction(changeRoleSchema, "members:manage", "changing roles", async (input, caller) => {
  await changeRole(caller, input.userId, input.role);
  revalidatePath("/settings");
  return { ok: true, data: undefined, message: "Role changed." };
});

export const dropMember = guardedAction(memberSchema, "members:manage", "removing members", async (input, caller) => {
  await removeMember(caller, input.userId);
  revalidatePath("/settings");
  return { ok: true, data: undefined, message: "Member removed." };
});

export const makeApiKey = guardedAction(apiKeySchema, "api-keys:manage", "creating API keys", async (input, caller) => {
  // API keys come with the plan: the Bench plan has none, the paid plans a number each.
  const billing = await billingOf(caller);
  if ((await activeApiKeyCount(caller)) >= billing.effective.apiKeys) {
    return {
      ok: false,
      code: "plan_limit",
      message:
        billing.effective.apiKeys === 0
          ? `The ${billing.effective.name} plan has no API access. Upgrade under Settings → Billing to connect an order system.`
          : `The ${billing.effective.name} plan allows ${billing.effective.apiKeys} API keys; revoke one or upgrade under Settings → ` +
            `Billing.`,
    };
  }
  const created = await createApiKey(caller, input.name, input.scopes);
  revalidatePath("/settings/api-keys");
  return { ok: true, data: { key: created.key, prefix: created.prefix } };
});

export const dropApiKey = guardedAction(idSchema, "api-keys:manage", "revoking API keys", async (input, caller) => {
  await revokeApiKey(caller, input.id);
  revalidatePath("/settings/api-keys");
  return { ok: true, data: undefined, message: "Key revoked: requests with it are refused from now on." };
});
