import type { Metadata } from "next";
import { listPlates } from "@/db/queries/library";
import { requireCaller } from "@/lib/auth/guards";
import { when } from "@/lib/format";
import { DataTable, EmptyState, PageHeader } from "../_components/page-header";

export const metadata: Metadata = { title: "Plates" };

const sourceLabel = { editor: "slab editor", api: "API", reprint: "reprint" } as const;

export default async function PlatesPage() {
  const caller = await requireCaller();
  const rows = await listPlates(caller);
  return (
    <>
      <PageHeader title="Plates" lead="Every print-ready file made in this workspace, newest first." />
      {rows.length === 0 ? (
        <EmptyState message="No plates yet: open a kit in the slab editor and make its first plate." />
      ) : (
        <DataTable label="Plates" head={["Made", "Kit", "Pieces", "From", "Status"]}>
          {rows.map((p) => (
            <tr key={p.id}>
              <td className="px-3 py-2 text-muted">{when(p.createdAt)}</td>
              <td className="px-3 py-2 font-bold">{p.kitName ?? "posted parts"}</td>
              <td className="px-3 py-2 font-mono">{p.pieceCount}</td>
              <td className="px-3 py-2">{sourceLabel[p.source]}</td>
              <td className="px-3 py-2">{p.status}</td>
            </tr>
          ))}
        </DataTable>
      )}
    </>
  );
}
