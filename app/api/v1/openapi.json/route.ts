import { openApiDocument } from "@/lib/api/openapi";

export const runtime = "nodejs";

/** GET /api/v1/openapi.json — the API described in OpenAPI 3.1, generated from the routes' zod schemas. */
export function GET() {
  return Response.json(openApiDocument(), { headers: { "Cache-Control": "public, max-age=300" } });
}
