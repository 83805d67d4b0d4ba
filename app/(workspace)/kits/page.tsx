import type { Metadata } from "next";
import { listKits } from "@/db/queries/library";
import { requireCaller } from "@/lib/auth/guards";
import { when } from "@/lib/format";
import { DataTable, EmptyState, PageHeader } from "../_components/page-header";

export const metadata: Metadata = { title: "Kits" };

export default async function KitsPage() {
  const caller = await requireCaller();
  const rows = await listKits(caller);
  return (
    <>
      <PageHeader title="Kits" lead="Sets of parts, with how many of each go on a slab." />
      {rows.length === 0 ? (
        <EmptyState message="No kits yet: group parts into a kit to lay out its slab." />
      ) : (
        <DataTable label="Kits" head={["Kit", "Pieces", "Last plate", "Changed"]}>
          {rows.map((k) => (
            <tr key={k.id}>
              <td className="px-3 py-2">
                <span className="font-bold">{k.name}</span>
                {k.description ? <span className="block text-xs text-muted">{k.description}</span> : null}
              </td>
              <td className="px-3 py-2 font-mono">{k.pieces}</td>
              <td className="px-3 py-2 text-muted">{k.lastPlateAt ? when(k.lastPlateAt) : "none yet"}</td>
              <td className="px-3 py-2 text-muted">{when(k.updatedAt)}</td>
            </tr>
          ))}
        </DataTable>
      )}
    </>
  );
}
