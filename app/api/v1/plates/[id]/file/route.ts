import { apiRoute } from "@/lib/api/respond";
import { plateById } from "@/db/queries/plates";
import { plateFile } from "@/lib/api/plates";
import { requireApiKey } from "@/lib/auth/api-guard";
import { BadRequest } from "@/lib/errors";
import { DEFAULT_EXPORT_FORMAT, EXPORT_FORMAT_IDS, isExportFormat } from "@/lib/geometry/formats";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/v1/plates/{id}/file?format=stl|3mf (scope plates:read). */
export const GET = apiRoute(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await requireApiKey(req, "plates:read");
  const format = new URL(req.url).searchParams.get("format") ?? DEFAULT_EXPORT_FORMAT;
  if (!isExportFormat(format)) throw new BadRequest("bad_request", `format must be ${EXPORT_FORMAT_IDS.join(" or ")}.`);
  return plateFile(caller, await plateById(caller, (await ctx.params).id), format);
});
