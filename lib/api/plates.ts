import "server-only";
import { createHash } from "node:crypto";
import { and, eq, sql } from "drizzle-orm";
import pg from "pg";
import { z } from "zod";
import { db } from "@/db";
import { idempotencyKeys, kitParts, kits, parts, plates, type Plate, type PlateInput } from "@/db/schema";
import type { ApiCaller } from "@/lib/auth/api-guard";
import { notFound } from "@/lib/auth/errors";
import { sniffHead } from "@/lib/geometry/io/sniff";
import type { StreamedForm } from "@/lib/api/multipart";
import { slabOptionsSchema, type SlabOptionsInput } from "@/lib/geometry/options";
import { mergeOptions, resolveValues, TemplateValueError, type TemplateVariableDef } from "@/lib/geometry/template";
import type { PlanId } from "@/lib/billing/plans";
import { buildPriority, meterPlate } from "@/lib/billing/service";
import { versionForPlate } from "@/lib/templates/service";
import { env } from "@/lib/env";
import { enqueueBuild, PLATE_CHANNEL } from "@/lib/jobs/queue";
import { callbackProblem } from "@/lib/jobs/webhook";
import { blobStore } from "@/lib/storage";
import { API_UNITS } from "@/lib/geometry/units";
import { formatSchema, quantitySchema, unitSchema, unitsSchema, variablesSchema } from "@/lib/validation/plates";
import { BadRequest, NotFound, Conflict, UnsupportedMedia, Invalid } from "@/lib/errors";


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
  if (!Array.isArray(list)) throw new Invalid("invalid_units", `units must be one of mm, cm, m, in, or a JSON array of them in part order; got ${JSON.stringify(raw.slice(0, 40))}.`, { field: "units" });
  if (list.length !== count) throw new Invalid("invalid_units", `units has ${list.length} entries for ${count} part files.`, { field: "units" });
  return list;
}

export type PlateRequest = {
  input: PlateInput;
  options: z.output<typeof slabOptionsSchema>;
  /** The options as sent (for the Idempotency-Key's request hash). */
  rawOptions: unknown;
  /** What the plate is built with: a template version's options with the sent ones over them. */
  storedOptions: SlabOptionsInput;
  template?: { id: string; version?: number; versionId: string };
  variables: Record<string, string>;
  format: z.infer<typeof formatSchema>;
  callbackUrl?: string;
  title: string;
  kitId?: string;
};

/**
 * Turn the multipart form into a build request: kit and options checked, and the part files (already
 * streamed into the blob store, content-addressed) refused here when plainly not meshes. The meshes
 * themselves are imported by the build worker, never in the web process.
 */
export async function readPlateRequest(caller: ApiCaller, form: StreamedForm, queryFormat: string | null): Promise<PlateRequest> {
  const files = form.files;
  const kitId = form.get("kit");
  if (form.fileFields.has("part")) throw new BadRequest("bad_request", "Each part must be a file.");
  if (form.fileFields.has("kit")) throw new BadRequest("bad_request", "kit must be an id.");
  if (files.length && kitId) throw new BadRequest("bad_request", "Send either part files or a kit, not both.");
  if (kitId && form.get("units")) throw new BadRequest("bad_request", "units applies to part files; a kit's parts keep the unit they were stored with (change it in the parts library).");
  if (!files.length && !kitId) throw new BadRequest("bad_request", "Send one or more `part` files, or a `kit` id.");
  const rawOptions = json(form, z.record(z.string(), z.unknown()), "options") ?? {};
  const templateRef = form.get("template");
  const versionRaw = form.get("templateVersion");
  if (form.fileFields.has("template")) throw new BadRequest("bad_request", "template must be a template id.");
  const templateVersion = versionRaw === null || versionRaw === "" ? undefined : Number(versionRaw);
  if (templateVersion !== undefined && !(Number.isInteger(templateVersion) && templateVersion >= 1)) throw new BadRequest("bad_request", "templateVersion must be a version number (1, 2, …).");
  if (templateVersion !== undefined && !templateRef) throw new BadRequest("bad_request", "templateVersion needs a template.");
  const version = templateRef ? await versionForPlate(caller.workspaceId, templateRef, templateVersion) : null;
  const storedOptions = version ? mergeOptions(version.options as SlabOptionsInput, rawOptions as SlabOptionsInput) : (rawOptions as SlabOptionsInput);
  const parsedOptions = slabOptionsSchema.safeParse(storedOptions);
  if (!parsedOptions.success) throw new Invalid("invalid_options", version ? "options over the template do not match the slab builder's options." : "options do not match the slab builder's options.", parsedOptions.error.issues);
  const givenVariables = json(form, variablesSchema, "variables") ?? {};
  const fmt = formatSchema.safeParse(form.get("format") ?? queryFormat ?? "3mf");
  if (!fmt.success) throw new BadRequest("bad_request", "format must be stl, 3mf or json.");
  const callbackUrl = form.get("callbackUrl") || undefined;
  if (callbackUrl) {
    const problem = await callbackProblem(callbackUrl);
    if (problem) throw new Invalid(problem.code, problem.message, { reason: problem.reason, ...(problem.address ? { address: problem.address } : {}) });
  }

  const input: PlateInput = { parts: [] };
  let title = "Slabwright plate";
  if (kitId) {
    const [kit] = await db().select().from(kits).where(and(eq(kits.id, kitId), eq(kits.workspaceId, caller.workspaceId)));
    if (!kit) throw new NotFound("not_found", "No such kit.");
    const lines = await db().select({ kp: kitParts, part: parts }).from(kitParts).innerJoin(parts, eq(parts.id, kitParts.partId)).where(eq(kitParts.kitId, kit.id)).orderBy(kitParts.position);
    input.kitId = kit.id;
    title = kit.name;
    input.parts = lines.map(({ kp, part }) => ({
      name: `${part.name}.${part.format}`,
      blobKey: part.blobKey,
      quantity: kp.quantity,
      unit: part.unit,
      layFlat: part.layFlat || kp.orientation === "lay-flat",
      turned: kp.orientation === "turned",
      rotation: kp.rotation,
      partId: part.id,
    }));
  } else {
    const quantity = json(form, quantitySchema, "quantity");
    if (quantity && quantity.length !== files.length) throw new Invalid("invalid", `quantity has ${quantity.length} entries for ${files.length} part files.`);
    const units = partUnits(form, files.length);
    for (const [i, f] of files.entries()) {
      // Refuse what is plainly not a mesh here, from its first bytes; the worker's import says what is wrong with the rest.
      if (f.size === 0) throw new Invalid("empty", `${f.name}: the file is empty.`);
      if (!sniffHead(f.head, f.size) && !(f.size >= 84 && /\.stl$/i.test(f.name))) {
        throw new UnsupportedMedia("not_a_mesh", `${f.name}: this is not a mesh file we recognise. Slabwright reads STL (binary or ASCII), 3MF and OBJ.`);
      }
      const unit = units?.[i];
      input.parts.push({ name: f.name || `part-${i + 1}.stl`, blobKey: f.key, quantity: quantity?.[i] ?? 1, ...(unit ? { unit: API_UNITS[unit] } : {}) });
    }
  }
  // The plate keeps every value it is made with, {date} included, so it can be made again exactly.
  const today = new Date().toISOString().slice(0, 10);
  let variables: Record<string, string>;
  if (version) {
    try {
      variables = resolveValues(version.variables as TemplateVariableDef[], givenVariables, { date: today, kit: kitId ? title : undefined });
    } catch (err) {
      if (err instanceof TemplateValueError) throw new Invalid(err.code, err.message, { variables: err.names });
      throw err;
    }
    input.templateId = version.templateId;
  } else {
    variables = { date: today, ...(kitId ? { kit: title } : {}), ...givenVariables };
  }
  return {
    input,
    options: parsedOptions.data,
    rawOptions: { options: rawOptions, template: templateRef ?? null, templateVersion: templateVersion ?? null, variables: givenVariables },
    storedOptions,
    template: version ? { id: version.templateId, version: version.version, versionId: version.id } : undefined,
    variables,
    format: fmt.data,
    callbackUrl,
    title,
    kitId: input.kitId,
  };
}

function requestHash(r: PlateRequest): string {
  // The request as sent ({date} is left out: a retry the next morning is still the same request).
  return createHash("sha256").update(JSON.stringify({ input: r.input, request: r.rawOptions, callbackUrl: r.callbackUrl ?? null })).digest("hex");
}

/**
 * Make the plate row and queue its build. With an Idempotency-Key, the same key and request within
 * 24 hours return the first plate; the same key with another request is a conflict (409).
 */
export async function createPlate(caller: ApiCaller, r: PlateRequest, idempotencyKey: string | null): Promise<{ plate: Plate; replay: boolean }> {
  const hash = requestHash(r);
  const found = idempotencyKey ? await priorPlate(caller, idempotencyKey, hash) : null;
  if (found) return { plate: found, replay: true };
  let plan: PlanId = "bench";
  const plate = await db().transaction(async (tx) => {
    // Counted against the plan in the same transaction as the plate: past the quota, nothing is stored.
    plan = (await meterPlate(tx, caller.workspaceId, 1, r.storedOptions)).plan;
    const [row] = await tx
      .insert(plates)
      .values({ workspaceId: caller.workspaceId, kitId: r.kitId ?? null, source: "api", status: "building", options: r.storedOptions as Record<string, unknown>, variables: r.variables, templateVersionId: r.template?.versionId ?? null, input: r.input, callbackUrl: r.callbackUrl ?? null, title: r.title, pieceCount: r.input.parts.reduce((s, p) => s + p.quantity, 0) * r.options.layout.copies })
      .returning();
    if (idempotencyKey) {
      const ins = await tx.insert(idempotencyKeys).values({ workspaceId: caller.workspaceId, key: idempotencyKey, requestHash: hash, plateId: row!.id }).onConflictDoNothing().returning();
      if (!ins[0]) return null; // another request with this key won the race
    }
    return row!;
  });
  if (!plate) {
    const again = await priorPlate(caller, idempotencyKey!, hash);
    if (again) return { plate: again, replay: true };
    throw new Conflict("idempotency_conflict", "This Idempotency-Key is being used by another request.");
  }
  try {
    const jobId = await enqueueBuild(plate.id, buildPriority(plan));
    const [withJob] = await db().update(plates).set({ jobId }).where(eq(plates.id, plate.id)).returning();
    return { plate: withJob!, replay: false };
  } catch (err) {
    await db().update(plates).set({ status: "failed", jobState: "failed", error: { code: "queue_unavailable", message: "The build queue is not available." } }).where(eq(plates.id, plate.id));
    throw err;
  }
}

/**
 * Make a plate again from exactly what it was made with (parts, options, values, template version):
 * the new files are byte for byte the old ones, whatever the template has become since.
 */
export async function remakePlate(workspaceId: string, plateId: string, userId: string | null): Promise<Plate> {
  const [old] = await db().select().from(plates).where(and(eq(plates.id, plateId), eq(plates.workspaceId, workspaceId)));
  if (!old) throw notFound("plate");
  if (!old.input) throw new Conflict("not_remakeable", "This plate has no stored inputs to make it from.");
  let plan: PlanId = "bench";
  const row = await db().transaction(async (tx) => {
    plan = (await meterPlate(tx, workspaceId, 1, old.options)).plan;
    const [r] = await tx
      .insert(plates)
      .values({ workspaceId, kitId: old.kitId, templateVersionId: old.templateVersionId, source: old.source, status: "building", options: old.options, variables: old.variables, input: old.input, title: old.title, pieceCount: old.pieceCount, createdBy: userId })
      .returning();
    return r;
  });
  try {
    const jobId = await enqueueBuild(row!.id, buildPriority(plan));
    const [withJob] = await db().update(plates).set({ jobId }).where(eq(plates.id, row!.id)).returning();
    return withJob!;
  } catch (err) {
    await db().update(plates).set({ status: "failed", jobState: "failed", error: { code: "queue_unavailable", message: "The build queue is not available." } }).where(eq(plates.id, row!.id));
    throw err;
  }
}

async function priorPlate(caller: ApiCaller, key: string, hash: string): Promise<Plate | null> {
  const [row] = await db()
    .select({ k: idempotencyKeys, p: plates })
    .from(idempotencyKeys)
    .innerJoin(plates, eq(plates.id, idempotencyKeys.plateId))
    .where(and(eq(idempotencyKeys.workspaceId, caller.workspaceId), eq(idempotencyKeys.key, key), sql`${idempotencyKeys.createdAt} > now() - interval '24 hours'`));
  if (!row) return null;
  if (row.k.requestHash !== hash) throw new Conflict("idempotency_conflict", "This Idempotency-Key was used with a different request in the last 24 hours.");
  return row.p;
}

export async function plateFor(caller: ApiCaller, id: string): Promise<Plate> {
  const [p] = await db().select().from(plates).where(and(eq(plates.id, id), eq(plates.workspaceId, caller.workspaceId)));
  if (!p) throw notFound("plate");
  return p;
}

export async function plateByJob(caller: ApiCaller, jobId: string): Promise<Plate> {
  const [p] = await db().select().from(plates).where(and(eq(plates.jobId, jobId), eq(plates.workspaceId, caller.workspaceId)));
  if (!p) throw notFound("job");
  return p;
}

const gw = globalThis as unknown as { __slabPlateListener?: Promise<Map<string, Set<() => void>>> };

/** One LISTEN connection per app process; a worker's NOTIFY wakes the requests waiting for that plate. */
function plateListener(): Promise<Map<string, Set<() => void>>> {
  gw.__slabPlateListener ??= (async () => {
    const waiters = new Map<string, Set<() => void>>();
    const client = new pg.Client({ connectionString: env().DATABASE_URL });
    client.on("notification", (n) => {
      for (const f of waiters.get(n.payload ?? "") ?? []) f();
    });
    client.on("error", (err) => {
      console.error("[plates] listener lost", err);
      gw.__slabPlateListener = undefined;
    });
    await client.connect();
    await client.query(`listen ${PLATE_CHANNEL}`);
    return waiters;
  })();
  return gw.__slabPlateListener;
}

/** Wait for a plate's build to end, up to `ms` (woken by the worker's NOTIFY, checked every second anyway). */
export async function waitForPlate(id: string, ms: number): Promise<Plate> {
  const until = Date.now() + ms;
  const waiters = await plateListener().catch(() => null);
  for (;;) {
    const [p] = await db().select().from(plates).where(eq(plates.id, id));
    if (!p || p.jobState === "done" || p.jobState === "failed" || Date.now() >= until) return p!;
    await new Promise<void>((resolve) => {
      const set = waiters?.get(id) ?? new Set();
      waiters?.set(id, set);
      const done = () => {
        set.delete(done);
        if (set.size === 0) waiters?.delete(id);
        clearTimeout(timer);
        resolve();
      };
      const timer = setTimeout(done, Math.min(1000, Math.max(1, until - Date.now())));
      set.add(done);
    });
  }
}

export function jobView(p: Plate) {
  return {
    id: p.jobId,
    status: p.jobState,
    progress: p.progress,
    statusUrl: `/api/v1/jobs/${p.jobId}`,
    plate: { id: p.id, url: `/api/v1/plates/${p.id}` },
    result: p.jobState === "done" ? { stl: `/api/v1/plates/${p.id}/file?format=stl`, "3mf": `/api/v1/plates/${p.id}/file?format=3mf` } : null,
    error: p.error ?? null,
  };
}

export function plateView(p: Plate) {
  const stats = (p.stats ?? {}) as { pieces?: unknown; layout?: unknown; [k: string]: unknown };
  const { pieces, layout, ...rest } = stats;
  return {
    plate: { id: p.id, status: p.status, job: jobView(p), kitId: p.kitId, pieceCount: p.pieceCount, createdAt: p.createdAt, finishedAt: p.finishedAt, title: p.title },
    pieces: pieces ?? [],
    layout: layout ?? null,
    findings: p.findings,
    estimates: p.estimates,
    stats: rest,
    proof: p.proof ?? null,
  };
}

/** The plate's file with its headers: type, a file name, the plate id and its warnings. */
export async function plateFile(plate: Plate, format: "stl" | "3mf"): Promise<Response> {
  const key = format === "stl" ? plate.stlBlobKey : plate.threeMfBlobKey;
  if (!key || plate.jobState !== "done") throw new Conflict("not_ready", `The plate is ${plate.jobState}; its files exist once the build is done.`);
  const bytes = await blobStore().get(key);
  const warnings = (plate.findings as { severity: string; code: string }[]).filter((f) => f.severity === "warning").map((f) => f.code);
  // The kit (or title) and the day the plate was made, e.g. harbour-run-token-set-2026-12-01.3mf.
  const stem = (plate.title ?? "plate").toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "").slice(0, 60) || "plate";
  const name = `${stem}-${plate.createdAt.toISOString().slice(0, 10)}-${plate.id.slice(0, 4)}.${format}`;
  return new Response(bytes as Uint8Array<ArrayBuffer>, {
    headers: {
      "Content-Type": format === "stl" ? "model/stl" : "model/3mf",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Content-Length": String(bytes.byteLength),
      "X-Plate-Id": plate.id,
      "X-Plate-Warnings": warnings.join(","),
    },
  });
}

