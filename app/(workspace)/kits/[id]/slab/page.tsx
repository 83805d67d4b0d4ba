import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getKit } from "@/db/queries/kits";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { PageHeader } from "../../../_components/page-header";
import { SlabEditor } from "./_components/slab-editor";

export const metadata: Metadata = { title: "Slab editor" };

export default async function SlabEditorPage({ params }: { params: Promise<{ id: string }> }) {
  const caller = await requireCaller();
  const kit = await getKit(caller, (await params).id);
  if (!kit) notFound();
  const parts = kit.lines.map((l) => ({ id: l.partId, name: l.name, quantity: l.quantity, rotation: l.rotation, orientation: l.orientation }));
  return (
    <>
      <PageHeader title={`Slab editor · ${kit.name}`} lead="Every change rebuilds the preview in your browser with the same engine that makes the plate." />
      <SlabEditor kitId={kit.id} kitName={kit.name} parts={parts} canMake={can(caller.role, "plates:make")} />
    </>
  );
}
