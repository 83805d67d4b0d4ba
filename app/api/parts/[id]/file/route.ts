import { apiRoute } from "@/lib/api/respond";
import { notFound } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/guards";
import { getPart } from "@/lib/parts/ingest";
import { blobStore } from "@/lib/storage";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/parts/{id}/file — the part's stored bytes, with how to read them, for the editor's engine. */
export const GET = apiRoute(async (_req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await authorize("workspace:view", "seeing parts");
  const part = await getPart(caller, (await ctx.params).id);
  if (!part) throw notFound("part");
  // Streamed from the store as it is read, never held whole in the server's memory.
  const blob = await blobStore().open(part.blobKey);
  return new Response(blob.stream, {
    headers: {
      "Content-Length": String(blob.size),
      "Content-Type": "application/octet-stream",
      "X-Part-Unit": part.unit,
      "X-Part-Lay-Flat": part.layFlat ? "1" : "0",
      "X-Part-Format": part.format,
      "Cache-Control": "private, max-age=60",
    },
  });
});
