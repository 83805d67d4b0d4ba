"use server";

import { revalidatePath } from "next/cache";
import { changeRole, createApiKey, inviteMember, removeMember, revokeApiKey, revokeInvitation } from "@/db/queries/accounts";
import { guardedAction } from "@/lib/auth/guards";
import { apiKeySchema, changeRoleSchema, idSchema, inviteSchema, memberSchema } from "@/lib/validation/accounts";

export const sendInvitation = guardedAction(inviteSchema, "invitations:manage", "inviting people", async (input, caller) => {
  await inviteMember(caller, input.email, input.role);
  revalidatePath("/settings");
  return { ok: true, data: undefined, message: `Invitation sent to ${input.email}.` };
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
  const created = await createApiKey(caller, input.name, input.scopes);
  revalidatePath("/settings/api-keys");
  return { ok: true, data: { key: created.key, prefix: created.prefix } };
});

export const dropApiKey = guardedAction(idSchema, "api-keys:manage", "revoking API keys", async (input, caller) => {
  await revokeApiKey(caller, input.id);
  revalidatePath("/settings/api-keys");
  return { ok: true, data: undefined, message: "Key revoked: requests with it are refused from now on." };
});
