import { z } from "zod";
import { PART_SORTS, searchParts } from "@/db/queries/parts";
import { apiRoute } from "@/lib/api/respond";
import { BadRequest } from "@/lib/errors";
import { authorize } from "@/lib/auth/guards";
import { UNIT_MM } from "@/lib/geometry/io/raw";
import { queueUpload, uploadView } from "@/lib/parts/ingest";
import { dropOrphans } from "@/lib/parts/orphans";
import { maxUploadBytes, plainRefusal, storeBody } from "@/lib/parts/upload";

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
 * can show progress; sent file by file). The body goes straight to the blob store; the file is
 * imported by a build worker, never here. Answers 202 with the upload `checking` and its URL, which
 * later says `ready` (with the parts) or `refused` (with the importer's code and message). What is
 * plainly not a mesh (by its first bytes) is refused at once: 415, or 422 when empty.
 */
export const POST = apiRoute(async (req: Request) => {
  const caller = await authorize("parts:write", "uploading parts");
  const parsed = uploadQuery.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  if (!parsed.success) throw new BadRequest("bad_request", "Say the file's name as ?name=…", parsed.error.issues);
  const q = parsed.data;
  const stored = await storeBody(req, maxUploadBytes());
  const refusal = plainRefusal(stored, q.name);
  if (refusal) {
    if (stored.created) await dropOrphans([stored.key]);
    throw refusal;
  }
  const upload = await queueUpload(caller, stored, q.name, { split: q.split === "1", unit: q.unit, layFlat: q.layFlat === "1" });
  const view = await uploadView(caller, upload);
  return Response.json({ upload: view }, { status: 202, headers: { Location: view.url } });
});
