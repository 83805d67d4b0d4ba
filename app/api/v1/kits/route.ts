import { apiListKits } from "@/db/queries/api-kits";
import { apiRoute } from "@/lib/api/respond";
import { requireApiKey } from "@/lib/auth/api-guard";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/v1/kits — the key's workspace's kits (scope kits:read). */
export const GET = apiRoute(async (req: Request) => {
  const caller = await requireApiKey(req, "kits:read");
  return Response.json({ kits: await apiListKits(caller) });
});
