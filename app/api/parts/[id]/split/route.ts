import { apiRoute } from "@/lib/api/respond";
import { authorize } from "@/lib/auth/guards";
import { splitPart } from "@/lib/parts/ingest";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** POST /api/parts/{id}/split — one part per body of a multi-body file. */
export const POST = apiRoute(async (_req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await authorize("parts:write", "splitting parts");
  const parts = await splitPart(caller, (await ctx.params).id);
  return Response.json({ parts }, { status: 201 });
});
