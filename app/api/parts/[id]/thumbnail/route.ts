import { apiRoute } from "@/lib/api/respond";
import { notFound } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/guards";
import { getPart } from "@/lib/parts/ingest";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/parts/{id}/thumbnail — the part's top view (SVG we drew ourselves, served with a locked-down policy). */
export const GET = apiRoute(async (_req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await authorize("workspace:view", "seeing parts");
  const part = await getPart(caller, (await ctx.params).id);
  if (!part?.thumbnailSvg) throw notFound("thumbnail");
  return new Response(part.thumbnailSvg, {
    headers: {
      "Content-Type": "image/svg+xml",
      "Cache-Control": "private, max-age=300",
      "Content-Security-Policy": "default-src 'none'; style-src 'unsafe-inline'; sandbox",
    },
  });
});
