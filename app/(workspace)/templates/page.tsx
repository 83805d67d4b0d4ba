import type { Metadata } from "next";
import { listTemplates } from "@/db/queries/library";
import { requireCaller } from "@/lib/auth/guards";
import { when } from "@/lib/format";
import { DataTable, EmptyState, PageHeader } from "../_components/page-header";

export const metadata: Metadata = { title: "Templates" };

export default async function TemplatesPage() {
  const caller = await requireCaller();
  const rows = await listTemplates(caller);
  return (
    <>
      <PageHeader title="Templates" lead="Saved slab recipes with placeholders such as {order} and {customer}, filled per plate." />
      {rows.length === 0 ? (
        <EmptyState message="No templates yet: save a slab's options from the editor to reuse them on every order." />
      ) : (
        <DataTable label="Templates" head={["Template", "Version", "Kind", "Changed"]}>
          {rows.map((t) => (
            <tr key={t.id}>
              <td className="px-3 py-2 font-bold">{t.name}</td>
              <td className="px-3 py-2 font-mono">v{t.version}</td>
              <td className="px-3 py-2 text-muted">{t.starter ? "starter" : "this workspace"}</td>
              <td className="px-3 py-2 text-muted">{when(t.updatedAt)}</td>
            </tr>
          ))}
        </DataTable>
      )}
    </>
  );
}
