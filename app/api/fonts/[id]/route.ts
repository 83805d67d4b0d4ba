import { readFile } from "node:fs/promises";
import path from "node:path";
import { apiRoute } from "@/lib/api/respond";
import { notFound } from "@/lib/errors";
import { ENGRAVING_FONTS, isEngravingFontId } from "@/lib/geometry/fonts";

export const runtime = "nodejs";

/** GET /api/fonts/{id} — an engraving face for the slab editor's in-browser engine (shipped in fonts/). */
export const GET = apiRoute(async (_req: Request, ctx: { params: Promise<{ id: string }> }) => {
  const { id } = await ctx.params;
  if (!isEngravingFontId(id)) throw notFound("font");
  const bytes = await readFile(path.join(process.cwd(), "fonts", ENGRAVING_FONTS[id].file));
  return new Response(new Uint8Array(bytes), { headers: { "Content-Type": "font/ttf", "Cache-Control": "public, max-age=86400" } });
});
