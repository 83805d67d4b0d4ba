import { plateById } from "@/db/queries/plates";
import { apiRoute } from "@/lib/api/respond";
import { requireApiKey } from "@/lib/auth/api-guard";
import { sheetResponse } from "@/lib/floor/sheet-response";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/v1/plates/{id}/map.pdf?paper=a4|letter|a3|tabloid — the plate map sheet (scope plates:read). */
export const GET = apiRoute(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await requireApiKey(req, "plates:read");
  return sheetResponse(req, caller, await plateById(caller, (await ctx.params).id));
});
