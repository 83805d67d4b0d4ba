import type { Metadata } from "next";
import { listMembers } from "@/db/queries/library";
import { requireCaller } from "@/lib/auth/guards";
import { when } from "@/lib/format";
import { DataTable, PageHeader } from "../_components/page-header";

export const metadata: Metadata = { title: "Settings" };

export default async function SettingsPage() {
  const caller = await requireCaller();
  const members = await listMembers(caller);
  return (
    <>
      <PageHeader title="Settings" lead={`${caller.workspace.name} · people and their roles`} />
      <DataTable label="Members" head={["Person", "E-mail", "Role", "Member since"]}>
        {members.map((m) => (
          <tr key={m.userId}>
            <td className="px-3 py-2 font-bold">{m.name ?? "—"}</td>
            <td className="px-3 py-2">{m.email}</td>
            <td className="px-3 py-2 capitalize">{m.role}</td>
            <td className="px-3 py-2 text-muted">{when(m.since)}</td>
          </tr>
        ))}
      </DataTable>
    </>
  );
}
