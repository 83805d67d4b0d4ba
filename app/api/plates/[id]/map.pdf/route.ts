import { apiRoute } from "@/lib/api/respond";
import { plateById } from "@/db/queries/plates";
import { authorize } from "@/lib/auth/guards";
import { sheetResponse } from "@/lib/floor/sheet-response";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/plates/{id}/map.pdf?paper=a4|letter|a3|tabloid — the plate map sheet for signed-in members. */
export const GET = apiRoute(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await authorize("workspace:view", "viewing plate maps");
  return sheetResponse(req, caller, await plateById(caller, (await ctx.params).id));
});
