import { apiRoute } from "@/lib/api/respond";
import { plateFile } from "@/lib/api/plates";
import { plateById } from "@/db/queries/plates";
import { authorize } from "@/lib/auth/guards";
import { BadRequest } from "@/lib/errors";
import { DEFAULT_EXPORT_FORMAT, EXPORT_FORMAT_IDS, isExportFormat } from "@/lib/geometry/formats";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/plates/{id}/download?format=stl|3mf — for signed-in members allowed to download plate files. */
export const GET = apiRoute(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await authorize("plates:download", "downloading plate files");
  const format = new URL(req.url).searchParams.get("format") ?? DEFAULT_EXPORT_FORMAT;
  if (!isExportFormat(format)) throw new BadRequest("bad_request", `format must be ${EXPORT_FORMAT_IDS.join(" or ")}.`);
  return plateFile(caller, await plateById(caller, (await ctx.params).id), format);
});
