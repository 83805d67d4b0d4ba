import { apiRoute } from "@/lib/api/respond";
import { plateByJob } from "@/db/queries/plates";
import { jobView } from "@/lib/api/plates";
import { requireApiKey } from "@/lib/auth/api-guard";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/v1/jobs/{id} — queued | running | done | failed, progress 0–1, result URLs, error. */
export const GET = apiRoute(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await requireApiKey(req, "plates:read");
  return Response.json({ job: jobView(await plateByJob(caller, (await ctx.params).id)) });
});
