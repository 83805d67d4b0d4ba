import type { Metadata } from "next";
import { listParts } from "@/db/queries/library";
import { requireCaller } from "@/lib/auth/guards";
import { count, size3, volume, when } from "@/lib/format";
import { DataTable, EmptyState, PageHeader } from "../_components/page-header";

export const metadata: Metadata = { title: "Parts" };

export default async function PartsPage() {
  const caller = await requireCaller();
  const rows = await listParts(caller);
  return (
    <>
      <PageHeader title="Parts" lead="The meshes your kits are made of, measured when they were uploaded." />
      {rows.length === 0 ? (
        <EmptyState message="No parts yet: upload the STL, 3MF or OBJ files of a kit to start." />
      ) : (
        <DataTable label="Parts" head={["Name", "Format", "Triangles", "Size (x × y × z)", "Volume", "Uploaded"]}>
          {rows.map((p) => (
            <tr key={p.id}>
              <td className="px-3 py-2 font-bold">{p.name}</td>
              <td className="px-3 py-2 uppercase">{p.format}</td>
              <td className="px-3 py-2 font-mono">{count(p.triangles)}</td>
              <td className="px-3 py-2 font-mono">{size3(p.sizeX, p.sizeY, p.sizeZ)}</td>
              <td className="px-3 py-2 font-mono">{volume(p.volume)}</td>
              <td className="px-3 py-2 text-muted">
                {when(p.createdAt)}
                {p.uploadedBy ? ` · ${p.uploadedBy}` : ""}
              </td>
            </tr>
          ))}
        </DataTable>
      )}
    </>
  );
}
