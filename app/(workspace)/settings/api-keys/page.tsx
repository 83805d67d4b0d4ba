import type { Metadata } from "next";
import { listApiKeys } from "@/lib/accounts/api-keys";
import { requirePermission } from "@/lib/auth/guards";
import { ApiKeys } from "./_components/api-keys";

export const metadata: Metadata = { title: "API keys" };

export default async function ApiKeysPage() {
  const { caller, allowed } = await requirePermission("api-keys:manage");
  if (!allowed) return <p className="card p-4 text-sm">Only the workspace&apos;s owners can see and manage API keys.</p>;
  const keys = await listApiKeys(caller);
  return (
    <ApiKeys
      keys={keys.map((k) => ({
        ...k,
        createdAt: k.createdAt.toISOString(),
        lastUsedAt: k.lastUsedAt?.toISOString() ?? null,
        revokedAt: k.revokedAt?.toISOString() ?? null,
      }))}
    />
  );
}
