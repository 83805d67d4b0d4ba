import type { Metadata } from "next";
import { listPendingInvitations } from "@/lib/accounts/invitations";
import { listMembers } from "@/lib/accounts/members";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { People } from "./_components/people";

export const metadata: Metadata = { title: "People" };

export default async function SettingsPage() {
  const caller = await requireCaller();
  const manage = can(caller.role, "members:manage");
  const members = await listMembers(caller);
  const pending = manage ? await listPendingInvitations(caller) : [];
  return (
    <People
      me={caller.user.id}
      manage={manage}
      members={members.map((m) => ({ ...m, since: m.since.toISOString() }))}
      pending={pending.map((p) => ({
        id: p.id,
        email: p.email,
        role: p.role,
        sentAt: p.createdAt.toISOString(),
        expiresAt: p.expiresAt.toISOString(),
      }))}
    />
  );
}
