import { apiRoute } from "@/lib/api/respond";
import { authorize } from "@/lib/auth/guards";
import { splitPart, uploadView } from "@/lib/parts/ingest";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/**
 * POST /api/parts/{id}/split — one part per body of a multi-body file, replacing it. A build worker
 * reads the file again: 202 with `upload`, whose `parts` are the new parts once it is `ready`.
 */
export const POST = apiRoute(async (_req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await authorize("parts:write", "splitting parts");
  const upload = await splitPart(caller, (await ctx.params).id);
  return Response.json(
    { upload: await uploadView(caller, upload) },
    { status: 202, headers: { Location: `/api/parts/uploads/${upload.id}` } },
  );
});
