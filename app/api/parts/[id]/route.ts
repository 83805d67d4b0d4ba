import { z } from "zod";
import { apiRoute } from "@/lib/api/respond";
import { notFound } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/guards";
import { UNIT_MM } from "@/lib/geometry/io/raw";
import { deletePart, getPart, updatePart, uploadView } from "@/lib/parts/ingest";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

export const GET = apiRoute(async (_req: Request, ctx: Ctx) => {
  const caller = await authorize("workspace:view", "seeing parts");
  const part = await getPart(caller, (await ctx.params).id);
  if (!part) throw notFound("part");
  const { thumbnailSvg: _svg, ...rest } = part;
  return Response.json({ part: rest });
});

const patchSchema = z
  .object({
    name: z.string().trim().min(1, "Name the part.").max(120).optional(),
    unit: z.enum(Object.keys(UNIT_MM) as [keyof typeof UNIT_MM]).optional(),
    layFlat: z.boolean().optional(),
  })
  .strict();

/**
 * PATCH /api/parts/{id} — rename (200), or read in another unit (inch → mm) or lay flat: those are
 * measured again by a build worker, so the answer is 202 with `upload` to follow (as for an upload).
 */
export const PATCH = apiRoute(async (req: Request, ctx: Ctx) => {
  const caller = await authorize("parts:write", "changing parts");
  const change = patchSchema.parse(await req.json());
  const { part, upload } = await updatePart(caller, (await ctx.params).id, change);
  const { thumbnailSvg: _svg, ...rest } = part;
  if (!upload) return Response.json({ part: rest });
  return Response.json(
    { part: rest, upload: await uploadView(caller, upload) },
    { status: 202, headers: { Location: `/api/parts/uploads/${upload.id}` } },
  );
});

/** DELETE /api/parts/{id} — refused (409) while a kit uses the part, naming the kits. */
export const DELETE = apiRoute(async (_req: Request, ctx: Ctx) => {
  const caller = await authorize("parts:write", "deleting parts");
  await deletePart(caller, (await ctx.params).id);
  return new Response(null, { status: 204 });
});
