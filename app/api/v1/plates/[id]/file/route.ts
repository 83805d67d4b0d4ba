import { apiRoute } from "@/lib/api/respond";
import { plateById } from "@/db/queries/plates";
import { plateFile } from "@/lib/api/plates";
import { requireApiKey } from "@/lib/auth/api-guard";
import { BadRequest } from "@/lib/errors";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/v1/plates/{id}/file?format=stl|3mf (scope plates:read). */
export const GET = apiRoute(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await requireApiKey(req, "plates:read");
  const format = new URL(req.url).searchParams.get("format") ?? "3mf";
  if (format !== "stl" && format !== "3mf") throw new BadRequest("bad_request", "format must be stl or 3mf.");
  return plateFile(await plateById(caller, (await ctx.params).id), format);
});
