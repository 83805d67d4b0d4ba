import type { Metadata } from "next";
import { partChoices } from "@/db/queries/kits";
import { requirePermission } from "@/lib/auth/guards";
import { PageHeader } from "../../_components/page-header";
import { KitForm } from "../_components/kit-form";

export const metadata: Metadata = { title: "New kit" };

export default async function NewKitPage() {
  const { caller, allowed } = await requirePermission("kits:write");
  if (!allowed) return <p className="card p-4 text-sm">Your role can look at kits but not make them; ask an owner or designer.</p>;
  return (
    <>
      <PageHeader title="New kit" lead="A set of parts with how many of each go on a slab." />
      <KitForm
        parts={await partChoices(caller)}
        initial={{ name: "", description: "", lines: [{ partId: "", quantity: 1, rotation: 0, orientation: "as-imported" }] }}
      />
    </>
  );
}
