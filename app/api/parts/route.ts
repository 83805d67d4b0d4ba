import { z } from "zod";
import { PART_SORTS, searchParts } from "@/db/queries/parts";
import { apiError, apiRoute } from "@/lib/api/respond";
import { authorize } from "@/lib/auth/guards";
import { UNIT_MM } from "@/lib/geometry/io/raw";
import { ingestFile } from "@/lib/parts/ingest";
import { maxUploadBytes, readLimited } from "@/lib/parts/upload";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

const listQuery = z.object({
  search: z.string().max(100).optional(),
  sort: z.enum(Object.keys(PART_SORTS) as [keyof typeof PART_SORTS]).optional(),
  dir: z.enum(["asc", "desc"]).optional(),
  page: z.coerce.number().int().min(1).max(10_000).optional(),
  pageSize: z.coerce.number().int().min(1).max(100).optional(),
});

/** GET /api/parts — the library for the signed-in member (search, sort, page). */
export const GET = apiRoute(async (req: Request) => {
  const caller = await authorize("workspace:view", "seeing parts");
  const q = listQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  const result = await searchParts(caller, q);
  return Response.json({ ...result, rows: result.rows.map((r) => ({ ...r, thumbnail: `/api/parts/${r.id}/thumbnail` })) });
});

const uploadQuery = z.object({
  name: z.string().trim().min(1).max(200),
  split: z.enum(["0", "1"]).optional(),
  unit: z.enum(Object.keys(UNIT_MM) as [keyof typeof UNIT_MM]).optional(),
  layFlat: z.enum(["0", "1"]).optional(),
});

/**
 * POST /api/parts?name=<file name> — one mesh file as the raw request body (streamed, so the page
 * can show progress; sent file by file). The content decides the format, not the name.
 */
export const POST = apiRoute(async (req: Request) => {
  const caller = await authorize("parts:write", "uploading parts");
  const parsed = uploadQuery.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  if (!parsed.success) return apiError(400, "bad_request", "Say the file's name as ?name=…", parsed.error.issues);
  const body = await readLimited(req, maxUploadBytes());
  if (body instanceof Response) return body;
  const q = parsed.data;
  const outcome = await ingestFile(caller, body, q.name, { split: q.split === "1", unit: q.unit, layFlat: q.layFlat === "1" });
  if (!outcome.ok) {
    const status = outcome.code === "not_a_mesh" ? 415 : outcome.code === "file_too_large" ? 413 : 422;
    return apiError(status, outcome.code, outcome.message, { file: outcome.file, ...outcome.details });
  }
  return Response.json(outcome, { status: 201 });
});
