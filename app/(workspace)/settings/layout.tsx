import type { ReactNode } from "react";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { env } from "@/lib/env";
import { aOrAn } from "@/lib/format";
import { PageHeader } from "../_components/page-header";
import { SettingsNav } from "./_components/settings-nav";

export default async function SettingsLayout({ children }: { children: ReactNode }) {
  const caller = await requireCaller();
  const owner = can(caller.role, "members:manage");
  const items = [
    { href: "/settings", label: "People" },
    { href: "/settings/account", label: "Your account" },
  ];
  if (owner)
    items.push(
      { href: "/settings/billing", label: "Billing" },
      { href: "/settings/api-keys", label: "API keys" },
      { href: "/settings/audit", label: "Audit log" },
    );
  if (env().SLAB_FAKE_SMTP === "1") items.push({ href: "/settings/outbox", label: "Outbox (demo)" });
  return (
    <>
      <PageHeader title="Settings" lead={`${caller.workspace.name} · you are ${aOrAn(caller.role)}`} />
      <SettingsNav items={items} />
      {children}
    </>
  );
}
