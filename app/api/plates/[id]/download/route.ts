import { apiRoute } from "@/lib/api/respond";
import { plateFile } from "@/lib/api/plates";
import { plateById } from "@/db/queries/plates";
import { authorize } from "@/lib/auth/guards";
import { BadRequest } from "@/lib/errors";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/plates/{id}/download?format=stl|3mf — for signed-in members allowed to download plate files. */
export const GET = apiRoute(async (req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const caller = await authorize("plates:download", "downloading plate files");
  const format = new URL(req.url).searchParams.get("format") ?? "3mf";
  if (format !== "stl" && format !== "3mf") throw new BadRequest("bad_request", "format must be stl or 3mf.");
  return plateFile(await plateById(caller, (await ctx.params).id), format);
});
