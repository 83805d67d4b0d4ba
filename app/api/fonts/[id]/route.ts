import { readFile } from "node:fs/promises";
import path from "node:path";
import { ENGRAVING_FONTS, isEngravingFontId } from "@/lib/geometry/fonts";

export const runtime = "nodejs";

/** GET /api/fonts/{id} — an engraving face for the slab editor's in-browser engine (shipped in fonts/). */
export async function GET(_req: Request, ctx: { params: Promise<{ id: string }> }) {
  const { id } = await ctx.params;
  if (!isEngravingFontId(id)) return Response.json({ error: { code: "not_found", message: "No such font." } }, { status: 404 });
  const bytes = await readFile(path.join(process.cwd(), "fonts", ENGRAVING_FONTS[id].file));
  return new Response(new Uint8Array(bytes), { headers: { "Content-Type": "font/ttf", "Cache-Control": "public, max-age=86400" } });
}
