import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getKit, partChoices } from "@/db/queries/kits";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { ORIENTATION_LABEL } from "@/lib/validation/kits";
import { PageHeader } from "../../_components/page-header";
import { KitForm } from "../_components/kit-form";

export const metadata: Metadata = { title: "Kit" };

export default async function KitPage({ params }: { params: Promise<{ id: string }> }) {
  const caller = await requireCaller();
  const kit = await getKit(caller, (await params).id);
  // Another workspace's kit and a missing one look the same.
  if (!kit) notFound();
  if (!can(caller.role, "kits:write")) {
    return (
      <>
        <PageHeader title={kit.name} lead={kit.description ?? undefined} />
        <ul className="card divide-y divide-hairline text-sm">
          {kit.lines.map((l) => (
            <li key={l.partId} className="px-3 py-2">
              {l.quantity} × {l.name} · {l.rotation}° · {ORIENTATION_LABEL[l.orientation]}
            </li>
          ))}
        </ul>
      </>
    );
  }
  return (
    <>
      <PageHeader title={`Edit ${kit.name}`} />
      <KitForm
        parts={await partChoices(caller)}
        initial={{ id: kit.id, name: kit.name, description: kit.description ?? "", lines: kit.lines.map(({ name: _n, ...l }) => l) }}
      />
    </>
  );
}
