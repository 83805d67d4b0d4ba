import { apiRoute } from "@/lib/api/respond";
import { requireApiKey } from "@/lib/auth/api-guard";
import type { SlabOptionsInput } from "@/lib/geometry/options";
import { usedPlaceholders, type TemplateVariableDef } from "@/lib/geometry/template";
import { listTemplates } from "@/lib/templates/service";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** GET /api/v1/templates — the key's workspace's templates and the starters (scope templates:read). */
export const GET = apiRoute(async (req: Request) => {
  const caller = await requireApiKey(req, "templates:read");
  const rows = await listTemplates(caller);
  return Response.json({
    templates: rows.map((t) => ({
      id: t.id,
      name: t.name,
      description: t.description,
      starter: t.starter,
      version: t.version,
      variables: t.variables as TemplateVariableDef[],
      placeholders: usedPlaceholders(t.options as SlabOptionsInput),
      updatedAt: t.updatedAt.toISOString(),
    })),
  });
});
