import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getKit } from "@/db/queries/kits";
import { listPlates } from "@/db/queries/library";
import type { SlabOptionsInput } from "@/lib/geometry/options";
import type { TemplateVariableDef } from "@/lib/geometry/template";
import { listTemplates } from "@/lib/templates/service";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { readSlabSettings } from "@/lib/validation/kits";
import { PageHeader } from "../../../_components/page-header";
import { PlatesTable } from "../../../plates/_components/plates-table";
import { SlabEditor } from "./_components/slab-editor";

export const metadata: Metadata = { title: "Slab editor" };

export default async function SlabEditorPage({
  params,
  searchParams,
}: {
  params: Promise<{ id: string }>;
  searchParams: Promise<{ template?: string }>;
}) {
  const caller = await requireCaller();
  const kit = await getKit(caller, (await params).id);
  if (!kit) notFound();
  const plates = await listPlates(caller, { kitId: kit.id, limit: 20 });
  const templates = (await listTemplates(caller)).map((t) => ({
    id: t.id,
    name: t.name,
    version: t.version,
    starter: t.starter,
    options: t.options as SlabOptionsInput,
    variables: t.variables as TemplateVariableDef[],
  }));
  const { template } = await searchParams;
  const canEdit = can(caller.role, "kits:write");
  const parts = kit.lines.map((l) => ({
    id: l.partId,
    name: l.name,
    quantity: l.quantity,
    rotation: l.rotation,
    orientation: l.orientation,
  }));
  return (
    <>
      <PageHeader
        title={`Slab editor · ${kit.name}`}
        lead={
          canEdit
            ? "Every change rebuilds the preview in your browser with the same engine that makes the plate; the kit keeps your last slab."
            : "The kit's slab as it was last set, built in your browser with the same engine that makes the plate."
        }
      />
      <SlabEditor
        kitId={kit.id}
        kitName={kit.name}
        parts={parts}
        canEdit={canEdit}
        canMake={can(caller.role, "plates:make")}
        saved={readSlabSettings(kit.slabSettings)}
        canSaveTemplates={can(caller.role, "templates:write")}
        templates={templates}
        initialTemplateId={template}
      />
      <section className="mt-6 space-y-2" aria-labelledby="kit-plates">
        <h2 id="kit-plates" className="text-lg">
          Plates of this kit
        </h2>
        <PlatesTable
          canMake={can(caller.role, "plates:make")}
          canDownload={can(caller.role, "plates:download")}
          rows={plates}
          label="Plates of this kit"
          showKit={false}
          empty={
            canEdit ? "No plate made from this kit yet: tune the slab above, then make the plate." : "No plate made from this kit yet."
          }
        />
      </section>
    </>
  );
}
