import { apiGetKit } from "@/db/queries/api-kits";
import { apiRoute } from "@/lib/api/respond";
import { requireApiKey } from "@/lib/auth/api-guard";
import { notFound } from "@/lib/auth/errors";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/v1/kits/{id} — one kit with its parts; another workspace's kit is "not found". */
export const GET = apiRoute(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await requireApiKey(req, "kits:read");
  const { id } = await ctx.params;
  const kit = await apiGetKit(caller, id);
  if (!kit) throw notFound("kit");
  return Response.json({ kit });
});
