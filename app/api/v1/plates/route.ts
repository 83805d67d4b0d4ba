import { apiError, apiRoute } from "@/lib/api/respond";
import { env } from "@/lib/env";
import { jobView, orderFromForm, plateFile, plateView } from "@/lib/api/plates";
import { createPlate } from "@/lib/plates/create";
import { resolvePlateRequest } from "@/lib/plates/request";
import { waitForPlate } from "@/lib/plates/wait";
import { requireApiKey } from "@/lib/auth/api-guard";
import { readMultipart } from "@/lib/api/multipart";
import { dropOrphans } from "@/lib/parts/orphans";
import { maxUploadBytes } from "@/lib/parts/upload";
import { BadRequest, TooLarge, UnsupportedMedia } from "@/lib/errors";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** How long a request waits for its build before answering 202 with the job (SLAB_SYNC_WAIT_MS, default 20 s). */
const syncWaitMs = () => env().SLAB_SYNC_WAIT_MS;

/**
 * POST /api/v1/plates — multipart: `part` files (or `kit`), `quantity`, `options`, `variables`,
 * `format`, `callbackUrl`. The body is read as a stream and cut off with 413 the moment it passes the
 * upload limit, whether or not it declared a length. Answers the file (200) when the build ends within the wait, else 202 with
 * the job. `Prefer: respond-async` (RFC 7240) asks for the 202 at once.
 */
export const POST = apiRoute(async (req: Request) => {
  const caller = await requireApiKey(req, "plates:write");
  const type = req.headers.get("content-type") ?? "";
  if (!type.startsWith("multipart/form-data"))
    throw new UnsupportedMedia("unsupported_media_type", "Send multipart/form-data with `part` files or a `kit` id.");
  const limit = maxUploadBytes();
  const declared = Number(req.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > limit)
    throw new TooLarge("file_too_large", `The request is larger than the ${(limit / 1024 / 1024).toFixed(0)} MB limit.`, { limit });
  // Streamed: counted as it arrives (a chunked body declares no length), each part file stored on the way.
  const form = await readMultipart(req, { maxBytes: limit });
  let request;
  try {
    request = await resolvePlateRequest(caller, orderFromForm(form, new URL(req.url).searchParams.get("format")));
  } catch (err) {
    // A refused request keeps none of the files it brought.
    await dropOrphans(form.files.filter((f) => f.created).map((f) => f.key));
    throw err;
  }
  const idem = req.headers.get("idempotency-key");
  if (idem !== null && !/^[\x21-\x7e]{1,200}$/.test(idem))
    throw new BadRequest("bad_request", "Idempotency-Key must be 1–200 visible ASCII characters.");
  const { plate } = await createPlate(caller, request.spec, {
    source: "api",
    ...(idem !== null ? { idempotency: { key: idem, requestHash: request.requestHash } } : {}),
  });
  const asyncOnly = /respond-async/i.test(req.headers.get("prefer") ?? "");
  const done = asyncOnly ? plate : await waitForPlate(caller, plate.id, syncWaitMs());
  if (done.jobState === "failed") {
    const e = done.error ?? { code: "build_failed", message: "The build failed." };
    return apiError(
      422,
      e.code,
      e.message,
      { plate: { id: done.id }, ...(e.code === "findings" ? { findings: e.details } : e.details ? { details: e.details } : {}) },
      { "X-Plate-Id": done.id },
    );
  }
  if (done.jobState !== "done") {
    return Response.json(
      { job: jobView(done) },
      { status: 202, headers: { Location: `/api/v1/jobs/${done.jobId}`, "X-Plate-Id": done.id } },
    );
  }
  if (request.format === "json") return Response.json(plateView(done), { headers: { "X-Plate-Id": done.id } });
  return plateFile(caller, done, request.format);
});
