import type { Metadata } from "next";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { PageHeader } from "../_components/page-header";
import { PartsLibrary } from "./_components/parts-library";

export const metadata: Metadata = { title: "Parts" };

export default async function PartsPage() {
  const caller = await requireCaller();
  return (
    <>
      <PageHeader title="Parts" lead="The meshes your kits are made of, measured as they will stand on the slab." />
      <PartsLibrary canWrite={can(caller.role, "parts:write")} />
    </>
  );
}
