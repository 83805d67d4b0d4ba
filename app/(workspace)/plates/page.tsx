import type { Metadata } from "next";
import { listPlates } from "@/db/queries/library";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { PageHeader } from "../_components/page-header";
import { PlatesTable } from "./_components/plates-table";

export const metadata: Metadata = { title: "Plates" };

export default async function PlatesPage() {
  const caller = await requireCaller();
  const rows = await listPlates(caller);
  return (
    <>
      <PageHeader title="Plates" lead="Every print-ready file made in this workspace, newest first." />
      <PlatesTable
        canMake={can(caller.role, "plates:make")}
        canDownload={can(caller.role, "plates:download")}
        rows={rows}
        label="Plates"
        empty="No plates yet: open a kit in the slab editor and make its first plate."
      />
    </>
  );
}
