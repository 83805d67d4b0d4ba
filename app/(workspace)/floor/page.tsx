import type { Metadata } from "next";
import { listPlates } from "@/db/queries/library";
import { requireCaller } from "@/lib/auth/guards";
import { when } from "@/lib/format";
import { DataTable, EmptyState, PageHeader } from "../_components/page-header";

export const metadata: Metadata = { title: "Floor" };

export default async function FloorPage() {
  const caller = await requireCaller();
  const ready = (await listPlates(caller)).filter((p) => p.status === "ready");
  return (
    <>
      <PageHeader title="Floor" lead="Plates waiting to be printed and checked. Let the bed cool before lifting a slab." />
      {ready.length === 0 ? (
        <EmptyState message="Nothing waiting to print: plates appear here once they are made." />
      ) : (
        <DataTable label="Plates to print" head={["Made", "Kit", "Pieces"]}>
          {ready.map((p) => (
            <tr key={p.id}>
              <td className="px-3 py-2 text-muted">{when(p.createdAt)}</td>
              <td className="px-3 py-2 font-bold">{p.kitName ?? "posted parts"}</td>
              <td className="px-3 py-2 font-mono">{p.pieceCount}</td>
            </tr>
          ))}
        </DataTable>
      )}
    </>
  );
}
