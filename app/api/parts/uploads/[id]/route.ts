import { apiRoute } from "@/lib/api/respond";
import { notFound } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/guards";
import { getUpload, uploadView } from "@/lib/parts/ingest";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/parts/uploads/{id} — an upload's state: `checking`, `ready` with its parts, or `refused` with the reason. */
export const GET = apiRoute(async (_req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await authorize("workspace:view", "seeing parts");
  const upload = await getUpload(caller, (await ctx.params).id);
  if (!upload) throw notFound("upload");
  return Response.json({ upload: await uploadView(caller, upload) }, { headers: { "Cache-Control": "no-store" } });
});
