import { apiRoute } from "@/lib/api/respond";
import { jobView } from "@/lib/api/plates";
import { plateById } from "@/db/queries/plates";
import { authorize } from "@/lib/auth/guards";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/plates/{id}/status — the editor's progress bar. */
export const GET = apiRoute(async (_req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await authorize("workspace:view", "seeing plates");
  const p = await plateById(caller, (await ctx.params).id);
  return Response.json({ job: jobView(p), findings: p.findings });
});
