import { apiRoute } from "@/lib/api/respond";
import { plateById } from "@/db/queries/plates";
import { plateView } from "@/lib/api/plates";
import { requireApiKey } from "@/lib/auth/api-guard";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/v1/plates/{id} — the plate: status, pieces, layout, findings, estimates (scope plates:read). */
export const GET = apiRoute(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await requireApiKey(req, "plates:read");
  return Response.json(plateView(await plateById(caller, (await ctx.params).id)));
});
