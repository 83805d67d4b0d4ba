import type { Metadata } from "next";
import Link from "next/link";
import { listKits } from "@/db/queries/library";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { when } from "@/lib/format";
import { DataTable, EmptyState, PageHeader } from "../_components/page-header";
import { KitRowActions } from "./_components/kit-row-actions";

export const metadata: Metadata = { title: "Kits" };

export default async function KitsPage() {
  const caller = await requireCaller();
  const rows = await listKits(caller);
  const write = can(caller.role, "kits:write");
  const newKit = write ? (
    <Link href="/kits/new" className="btn-primary">
      New kit
    </Link>
  ) : undefined;
  return (
    <>
      <PageHeader title="Kits" lead="Sets of parts, with how many of each go on a slab." actions={rows.length ? newKit : undefined} />
      {rows.length === 0 ? (
        <EmptyState message="No kits yet: group parts into a kit to lay out its slab." action={newKit} />
      ) : (
        <DataTable label="Kits" head={["Kit", "Pieces", "Last plate", "Changed", ...(write ? [""] : [])]}>
          {rows.map((k) => (
            <tr key={k.id}>
              <td className="px-3 py-2">
                <Link href={`/kits/${k.id}`} className="font-bold hover:text-accent">
                  {k.name}
                </Link>
                {k.description ? <span className="block text-xs text-muted">{k.description}</span> : null}
                <Link href={`/kits/${k.id}/slab`} className="text-xs text-accent underline">
                  Slab editor →
                </Link>
              </td>
              <td className="px-3 py-2 font-mono">{k.pieces}</td>
              <td className="px-3 py-2 text-muted">{k.lastPlateAt ? when(k.lastPlateAt) : "none yet"}</td>
              <td className="px-3 py-2 text-muted">{when(k.updatedAt)}</td>
              {write ? (
                <td className="px-3 py-2 text-right">
                  <KitRowActions id={k.id} name={k.name} />
                </td>
              ) : null}
            </tr>
          ))}
        </DataTable>
      )}
    </>
  );
}
