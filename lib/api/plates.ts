import "server-only";
import { z } from "zod";
import type { Plate } from "@/db/schema";
import type { StreamedForm } from "@/lib/api/multipart";
import { BadRequest, Conflict, Invalid, NotFound } from "@/lib/errors";
import type { PlateOrder } from "@/lib/plates/request";
import { EXPORT_FORMAT_IDS, EXPORT_FORMATS, type ExportFormatId } from "@/lib/geometry/formats";
import { plateFileOf } from "@/db/queries/plates";
import type { WorkspaceActor } from "@/lib/auth/actor";
import { blobStore } from "@/lib/storage";
import { formatSchema, quantitySchema, referenceSchema, unitSchema, unitsSchema, variablesSchema } from "@/lib/validation/plates";

/** The plate API's HTTP side: the multipart form read into a typed order, and the views it answers with. */
function json<T>(form: StreamedForm, schema: z.ZodType<T>, field: string): T | undefined {
  if (form.fileFields.has(field)) throw new BadRequest("bad_request", `${field} must be a text field holding JSON.`);
  const raw = form.get(field);
  if (raw === null || raw === "") return undefined;
  let value: unknown;
  try {
    value = JSON.parse(raw);
  } catch {
    throw new BadRequest("bad_request", `${field} is not valid JSON.`);
  }
  const parsed = schema.safeParse(value);
  if (!parsed.success) throw new Invalid("invalid", `${field} does not match the schema.`, parsed.error.issues);
  return parsed.data;
}

/**
 * `units`: a plain unit name for every part file ("m"), or a JSON array in part order (["mm", "in"]).
 * A kit's parts keep the unit they were stored with.
 */
function partUnits(form: StreamedForm, count: number): z.infer<typeof unitSchema>[] | undefined {
  if (form.fileFields.has("units")) throw new BadRequest("bad_request", "units must be a text field.");
  const raw = form.get("units")?.trim();
  if (!raw) return undefined;
  const one = unitSchema.safeParse(raw);
  if (one.success) return Array.from({ length: count }, () => one.data);
  const list = raw.startsWith("[") ? json(form, unitsSchema, "units") : undefined;
  if (!Array.isArray(list))
    throw new Invalid(
      "invalid_units",
      `units must be one of mm, cm, m, in, or a JSON array of them in part order; got ${JSON.stringify(raw.slice(0, 40))}.`,
      { field: "units" },
    );
  if (list.length !== count)
    throw new Invalid("invalid_units", `units has ${list.length} entries for ${count} part files.`, { field: "units" });
  return list;
}

/**
 * The multipart form of `POST /api/v1/plates` as a typed order: `part` files (already streamed into
 * the blob store) with `quantity` and `units`, or a `kit` id; `options`, `template`, `templateVersion`,
 * `variables`, `format` (or `?format=`), `callbackUrl`. Malformed fields are refused here (400/422).
 */
export function orderFromForm(form: StreamedForm, queryFormat: string | null): PlateOrder {
  const files = form.files;
  const kitId = form.get("kit");
  if (form.fileFields.has("part")) throw new BadRequest("bad_request", "Each part must be a file.");
  if (form.fileFields.has("kit")) throw new BadRequest("bad_request", "kit must be an id.");
  if (files.length && kitId) throw new BadRequest("bad_request", "Send either part files or a kit, not both.");
  if (kitId && form.get("units"))
    throw new BadRequest(
      "bad_request",
      "units applies to part files; a kit's parts keep the unit they were stored with (change it in the parts library).",
    );
  if (!files.length && !kitId) throw new BadRequest("bad_request", "Send one or more `part` files, or a `kit` id.");
  const options = json(form, z.record(z.string(), z.unknown()), "options") ?? {};
  const templateRef = form.get("template");
  const versionRaw = form.get("templateVersion");
  if (form.fileFields.has("template")) throw new BadRequest("bad_request", "template must be a template id.");
  const templateVersion = versionRaw === null || versionRaw === "" ? undefined : Number(versionRaw);
  if (templateVersion !== undefined && !(Number.isInteger(templateVersion) && templateVersion >= 1))
    throw new BadRequest("bad_request", "templateVersion must be a version number (1, 2, …).");
  if (templateVersion !== undefined && !templateRef) throw new BadRequest("bad_request", "templateVersion needs a template.");
  const variables = json(form, variablesSchema, "variables") ?? {};
  const fmt = formatSchema.safeParse(form.get("format") ?? queryFormat ?? "3mf");
  if (!fmt.success) throw new BadRequest("bad_request", "format must be stl, 3mf or json.");
  const callbackUrl = form.get("callbackUrl") || undefined;
  if (form.fileFields.has("reference")) throw new BadRequest("bad_request", "reference must be a text field.");
  const ref = referenceSchema.safeParse(form.get("reference") ?? "");
  if (!ref.success)
    throw new Invalid("invalid_reference", ref.error.issues[0]?.message ?? "reference is not valid.", { field: "reference" });
  const order: PlateOrder = {
    options,
    variables,
    format: fmt.data,
    ...(templateRef ? { template: { id: templateRef, ...(templateVersion ? { version: templateVersion } : {}) } } : {}),
    ...(callbackUrl ? { callbackUrl } : {}),
    ...(ref.data ? { reference: ref.data } : {}),
  };
  if (kitId) return { ...order, kitId };
  const quantity = json(form, quantitySchema, "quantity");
  if (quantity && quantity.length !== files.length)
    throw new Invalid("invalid", `quantity has ${quantity.length} entries for ${files.length} part files.`);
  const units = partUnits(form, files.length);
  return {
    ...order,
    files: files.map((f, i) => ({
      name: f.name,
      key: f.key,
      size: f.size,
      head: f.head,
      quantity: quantity?.[i] ?? 1,
      ...(units?.[i] ? { unit: units[i] } : {}),
    })),
  };
}

export function jobView(p: Plate) {
  return {
    id: p.jobId,
    status: p.jobState,
    progress: p.progress,
    statusUrl: `/api/v1/jobs/${p.jobId}`,
    plate: { id: p.id, url: `/api/v1/plates/${p.id}` },
    result: p.jobState === "done" ? Object.fromEntries(EXPORT_FORMAT_IDS.map((f) => [f, `/api/v1/plates/${p.id}/file?format=${f}`])) : null,
    error: p.error ?? null,
  };
}

export function plateView(p: Plate) {
  const stats = (p.stats ?? {}) as { pieces?: unknown; layout?: unknown; [k: string]: unknown };
  const { pieces, layout, ...rest } = stats;
  return {
    plate: {
      id: p.id,
      status: p.status,
      job: jobView(p),
      kitId: p.kitId,
      pieceCount: p.pieceCount,
      createdAt: p.createdAt,
      finishedAt: p.finishedAt,
      title: p.title,
      reference: p.reference,
    },
    pieces: pieces ?? [],
    layout: layout ?? null,
    findings: p.findings,
    estimates: p.estimates,
    stats: rest,
    proof: p.proof ?? null,
  };
}

/** The plate's file with its headers: type, a file name, the plate id and its warnings. */
export async function plateFile(actor: WorkspaceActor, plate: Plate, format: ExportFormatId): Promise<Response> {
  if (plate.jobState !== "done") throw new Conflict("not_ready", `The plate is ${plate.jobState}; its files exist once the build is done.`);
  const file = await plateFileOf(actor, plate.id, format);
  if (!file) throw new NotFound("no_file", `This plate was not written as ${EXPORT_FORMATS[format].label}.`);
  // Streamed from the store as it is read: a 30 MB plate file is never held whole in the server's memory.
  const blob = await blobStore().open(file.blobKey);
  const warnings = (plate.findings as { severity: string; code: string }[]).filter((f) => f.severity === "warning").map((f) => f.code);
  // The kit (or title) and the day the plate was made, e.g. harbour-run-token-set-2026-12-01.3mf.
  const stem =
    (plate.title ?? "plate")
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-|-$/g, "")
      .slice(0, 60) || "plate";
  const name = `${stem}-${plate.createdAt.toISOString().slice(0, 10)}-${plate.id.slice(0, 4)}${EXPORT_FORMATS[format].extension}`;
  return new Response(blob.stream, {
    headers: {
      "Content-Type": EXPORT_FORMATS[format].mime,
      "Content-Disposition": `attachment; filename="${name}"`,
      "Content-Length": String(blob.size),
      // The file's SHA-256 as its entity tag (RFC 9110 §8.8.3): the same plate file, the same tag.
      ETag: `"${file.sha256}"`,
      "X-Plate-Id": plate.id,
      "X-Plate-Warnings": warnings.join(","),
    },
  });
}
