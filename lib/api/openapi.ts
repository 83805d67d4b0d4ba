import { z } from "zod";
import { templateVariableSchema } from "@/lib/geometry/template";
import { apiKeyScopes } from "@/db/schema/workspaces";
import { slabOptionsSchema } from "@/lib/geometry/options";
import { APP_VERSION } from "@/lib/version";
import { PAPER_IDS } from "@/lib/floor/sheet-layout";
import { EXPORT_FORMAT_IDS, EXPORT_FORMATS, IMPORT_FORMAT_IDS, IMPORT_FORMATS } from "@/lib/geometry/formats";
import { formatSchema, quantitySchema, referenceSchema, unitsSchema, variablesSchema } from "@/lib/validation/plates";

/** A plate file in each export format, by its media type. */
const fileContent = () =>
  Object.fromEntries(
    EXPORT_FORMAT_IDS.map((f) => [EXPORT_FORMATS[f].mime, { schema: { type: "string", contentMediaType: EXPORT_FORMATS[f].mime } }]),
  );

/** Response shapes of the public API, as zod schemas: the OpenAPI document is generated from them. */
export const errorSchema = z.object({ error: z.object({ code: z.string(), message: z.string(), details: z.unknown().optional() }) });
export const jobSchema = z.object({
  id: z.string(),
  status: z.enum(["queued", "running", "done", "failed"]),
  progress: z.number().min(0).max(1),
  statusUrl: z.string(),
  plate: z.object({ id: z.string(), url: z.string() }),
  result: z.object(Object.fromEntries(EXPORT_FORMAT_IDS.map((f) => [f, z.string()]))).nullable(),
  error: z.object({ code: z.string(), message: z.string(), details: z.unknown().optional() }).nullable(),
});
export const findingSchema = z.object({
  severity: z.enum(["error", "warning", "info"]),
  code: z.string(),
  message: z.string(),
  piece: z.number().int().optional(),
  pieces: z.array(z.number().int()).optional(),
  field: z
    .array(z.union([z.string(), z.number().int()]))
    .optional()
    .describe('Where an option is the cause: its path in the options, e.g. ["marks", "text", 0, "depth"].'),
});
export const proofSchema = z.object({
  ok: z.boolean(),
  failed: z
    .enum(["stl", "closed", "oriented", "volume", "bodies", "on_slab", "apart", "gap", "floor", "qr", "three_mf"])
    .optional()
    .describe("The first rule that failed."),
  rules: z.array(
    z.object({ rule: z.string(), pass: z.boolean(), figure: z.union([z.number(), z.string()]).optional(), message: z.string() }),
  ),
  figures: z.object({
    bodies: z.number().int(),
    openEdges: z.number().int(),
    minFloor: z.number().nullable().describe("mm"),
    worstSupport: z.number().nullable().describe("% of the worst piece's lowest layer over the slab"),
    qrText: z.string().nullable(),
  }),
  ms: z.number(),
  summary: z.string().describe('One line, e.g. "Checked: closed, 14 bodies, every piece on the slab, QR reads back, 3MF matches".'),
  timings: z.record(z.string(), z.number()).optional(),
});
export const plateSchema = z.object({
  plate: z.object({
    id: z.string(),
    status: z.enum(["building", "ready", "failed"]),
    job: jobSchema,
    kitId: z.string().nullable(),
    pieceCount: z.number().int(),
    createdAt: z.string(),
    finishedAt: z.string().nullable(),
    title: z.string().nullable(),
    reference: z.string().nullable().describe("The order system's reference sent with the plate (null when none was sent)."),
  }),
  pieces: z.array(z.record(z.string(), z.unknown())),
  layout: z.record(z.string(), z.unknown()).nullable(),
  findings: z.array(findingSchema),
  estimates: z.record(z.string(), z.unknown()).nullable(),
  stats: z.record(z.string(), z.unknown()),
  proof: proofSchema
    .nullable()
    .describe(
      "The independent check of the exported STL and 3MF run after every build; null for a plate still building or failed before its " +
        "files were made.",
    ),
});
export const kitListSchema = z.object({
  kits: z.array(z.object({ id: z.string(), name: z.string(), description: z.string().nullable(), updatedAt: z.string() })),
});

const plateForm = z.object({
  part: z
    .array(z.string())
    .optional()
    .describe("Mesh files (STL, 3MF, OBJ); the file name is the part's name. Repeat the field for several parts."),
  kit: z.string().optional().describe("A stored kit's id, instead of part files."),
  quantity: z
    .string()
    .optional()
    .describe(`JSON array of quantities matching the part order, e.g. [2, 1]. Schema: ${JSON.stringify(z.toJSONSchema(quantitySchema))}`),
  units: z
    .string()
    .optional()
    .describe(
      `Length unit of the part files (STL and OBJ carry none; millimetres when left out; overrides a 3MF's own): one of mm, cm, m, ` +
        `in for every file, or a JSON array in part order, e.g. ["mm", "in"]. Not with a kit (its parts keep their stored unit). A ` +
        `part under 1 mm or too large for the bed is refused with a finding (part_too_small, part_larger_than_bed) that names the ` +
        `unit to send; the importer's units_suspect warning is among the findings. Schema: ${JSON.stringify(z.toJSONSchema(unitsSchema))}`,
    ),
  options: z.string().optional().describe("JSON object with the slab builder's options (see the SlabOptions schema)."),
  variables: z
    .string()
    .optional()
    .describe(`JSON object filling {name} placeholders. Schema: ${JSON.stringify(z.toJSONSchema(variablesSchema))}`),
  format: formatSchema.optional(),
  callbackUrl: z
    .string()
    .optional()
    .describe(
      "http(s) URL at a public address, called with a signed plate.done / plate.failed event (retried with backoff). Private, " +
        "loopback, link-local and other special addresses are refused with 422 invalid_callback.",
    ),
  template: z
    .string()
    .optional()
    .describe(
      "A template id (see GET /api/v1/templates); options override its options, variables fill its {placeholders} (a variable the " +
        "template lacks is a 422 unknown_variable, one without a value or default a 422 missing_variable).",
    ),
  templateVersion: z
    .string()
    .optional()
    .describe("A version number of the template, to make a plate with an earlier version; the newest by default."),
  reference: referenceSchema
    .optional()
    .describe(
      "Your own reference for the order, e.g. ORD-1042 (at most 80 characters, no control characters; blank is none): kept on the " +
        "plate, shown wherever it is named (the floor, the plate map, the 3MF's Title), found by the floor's search, and kept by its " +
        "reprints. A longer one is a 422 invalid_reference.",
    ),
});

export const templateListSchema = z.object({
  templates: z.array(
    z.object({
      id: z.string(),
      name: z.string(),
      description: z.string(),
      starter: z.boolean().describe("Shipped with Slabwright (shared by every workspace; duplicate it to change it)."),
      version: z.number().int(),
      variables: z.array(templateVariableSchema),
      placeholders: z.array(z.string()).describe("Every {placeholder} the template's text and QR use, built-ins ({date}, {kit}) included."),
      updatedAt: z.string(),
    }),
  ),
});

function schema(s: z.ZodType, io: "input" | "output" = "output") {
  const { $schema: _drop, ...rest } = z.toJSONSchema(s, { io, unrepresentable: "any", reused: "inline" }) as Record<string, unknown>;
  return rest;
}

const ref = (name: string) => ({ $ref: `#/components/schemas/${name}` });
const errors = (...codes: number[]) =>
  Object.fromEntries(codes.map((c) => [String(c), { description: STATUS[c]!, content: { "application/json": { schema: ref("Error") } } }]));
const STATUS: Record<number, string> = {
  400: "Malformed request",
  402: "Plan limit: the plan's plates for this period are made, or the plan has no order API (code plan_limit)",
  401: "Missing, unknown or revoked API key",
  403: "The key lacks the scope",
  404: "Not found (or another workspace's)",
  409: "Conflict (Idempotency-Key reused with another request, or the plate is not ready)",
  413:
    "Too large (code file_too_large: the request passed the upload limit, counted as it arrives, chunked or not; too_many_files, " +
    "field_too_large)",
  415: "Not multipart, or a part that is not a mesh",
  422: "Invalid options or parts, or findings of severity error",
  429: "Rate limited (see Retry-After)",
};

/** OpenAPI 3.1, generated from the same zod schemas the routes validate with. */
export function openApiDocument() {
  const idParam = (name: string) => ({ name, in: "path", required: true, schema: { type: "string" } });
  return {
    openapi: "3.1.0",
    info: {
      title: "Slabwright API",
      version: APP_VERSION,
      description: "Post part meshes or name a kit and get a print-ready plate (carrier slab with marks) back.",
    },
    servers: [{ url: "/" }],
    security: [{ apiKey: [] }],
    components: {
      securitySchemes: {
        apiKey: { type: "http", scheme: "bearer", description: `An API key from Settings → API keys. Scopes: ${apiKeyScopes.join(", ")}.` },
      },
      schemas: {
        SlabOptions: schema(slabOptionsSchema, "input"),
        Error: schema(errorSchema),
        Job: schema(jobSchema),
        Finding: schema(findingSchema),
        Plate: schema(plateSchema),
        KitList: schema(kitListSchema),
        TemplateList: schema(templateListSchema),
      },
    },
    paths: {
      "/api/v1/plates": {
        post: {
          operationId: "createPlate",
          summary: "Make a plate (scope plates:write)",
          description:
            "The multipart body is read as a stream: its bytes are counted as they arrive, whether or not it declares a " +
            "Content-Length, and reading stops with 413 the moment they pass the upload limit. Part files go straight to storage; " +
            "one that is plainly not a mesh (by its first bytes) is refused at once (415, or 422 `empty`). The meshes are imported " +
            "by the build worker, not while the request is read: an import refusal (e.g. `open_mesh`, `too_many_triangles`, " +
            "`too_many_vertices`, `too_many_bodies`, `archive_too_large`) comes back as the build's 422 within the wait, " +
            "or as the job's `error` when the answer is 202. A text line longer than its room (its `maxWidth`, or what the bed " +
            "leaves it) follows its `fit`: `shrink` (the default) makes it smaller, never below the smallest cap height whose " +
            "strokes print at the nozzle, and says so in a `text_shrunk` warning; `refuse`, or a line too long even at that floor, " +
            "is a 422 with the `text_too_long` finding, whose `field` names the line (e.g. `marks.text.1.value`).",
          parameters: [
            {
              name: "Idempotency-Key",
              in: "header",
              required: false,
              schema: { type: "string", maxLength: 200 },
              description: "Same key and request within 24 h → the same plate.",
            },
            {
              name: "Prefer",
              in: "header",
              required: false,
              schema: { type: "string", enum: ["respond-async"] },
              description: "Answer 202 with the job at once.",
            },
            { name: "format", in: "query", required: false, schema: schema(formatSchema) },
          ],
          requestBody: {
            required: true,
            content: {
              "multipart/form-data": {
                schema: schema(plateForm, "input"),
                encoding: {
                  part: {
                    contentType: ["application/octet-stream", ...IMPORT_FORMAT_IDS.flatMap((f) => IMPORT_FORMATS[f].mime)].join(", "),
                  },
                },
              },
            },
          },
          responses: {
            "200": {
              description: "The plate file (or JSON with format=json). Headers X-Plate-Id and X-Plate-Warnings.",
              headers: { "X-Plate-Id": { schema: { type: "string" } }, "X-Plate-Warnings": { schema: { type: "string" } } },
              content: { ...fileContent(), "application/json": { schema: ref("Plate") } },
            },
            "202": {
              description: "Still building: poll the job.",
              content: { "application/json": { schema: { type: "object", properties: { job: ref("Job") }, required: ["job"] } } },
            },
            ...errors(400, 401, 402, 403, 404, 409, 413, 415, 422, 429),
          },
        },
      },
      "/api/v1/jobs/{id}": {
        get: {
          operationId: "getJob",
          summary: "A build job (scope plates:read)",
          parameters: [idParam("id")],
          responses: {
            "200": {
              description: "The job",
              content: { "application/json": { schema: { type: "object", properties: { job: ref("Job") }, required: ["job"] } } },
            },
            ...errors(401, 403, 404, 429),
          },
        },
      },
      "/api/v1/plates/{id}": {
        get: {
          operationId: "getPlate",
          summary: "A plate (scope plates:read)",
          parameters: [idParam("id")],
          responses: {
            "200": { description: "The plate", content: { "application/json": { schema: ref("Plate") } } },
            ...errors(401, 403, 404, 429),
          },
        },
      },
      "/api/v1/plates/{id}/file": {
        get: {
          operationId: "getPlateFile",
          summary: "A plate's file (scope plates:read)",
          parameters: [
            idParam("id"),
            { name: "format", in: "query", required: false, schema: { type: "string", enum: EXPORT_FORMAT_IDS } },
          ],
          responses: { "200": { description: "The file", content: fileContent() }, ...errors(400, 401, 403, 404, 409, 429) },
        },
      },
      "/api/v1/plates/{id}/map.pdf": {
        get: {
          operationId: "getPlateMap",
          summary: "The plate map sheet as PDF: top view at 1:1, piece table, QR code to the plate's inspection page (scope plates:read)",
          parameters: [
            idParam("id"),
            {
              name: "paper",
              in: "query",
              required: false,
              description: "a4 by default",
              schema: { type: "string", enum: PAPER_IDS },
            },
          ],
          responses: {
            "200": {
              description:
                "One page when the slab fits it at 1:1; otherwise a first page with an overview at a stated scale, then the slab at " +
                "1:1 on pages of its own, tiled with overlap marks and page labels when it is larger than the paper",
              content: { "application/pdf": { schema: { type: "string", contentMediaType: "application/pdf" } } },
            },
            ...errors(400, 401, 403, 404, 409, 429),
          },
        },
      },
      "/api/v1/templates": {
        get: {
          operationId: "listTemplates",
          summary: "The workspace's templates and the starters (scope templates:read)",
          responses: {
            "200": { description: "Templates", content: { "application/json": { schema: ref("TemplateList") } } },
            ...errors(401, 403, 429),
          },
        },
      },
      "/api/v1/kits": {
        get: {
          operationId: "listKits",
          summary: "The workspace's kits (scope kits:read)",
          responses: {
            "200": { description: "Kits", content: { "application/json": { schema: ref("KitList") } } },
            ...errors(401, 403, 429),
          },
        },
      },
    },
  };
}
