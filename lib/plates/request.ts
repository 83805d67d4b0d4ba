import "server-only";
import { createHash } from "node:crypto";
import type { z } from "zod";
import type { PlateInput } from "@/db/schema";
import { kitForPlate } from "@/db/queries/plates";
import type { WorkspaceActor } from "@/lib/auth/actor";
import { Invalid, UnsupportedMedia } from "@/lib/errors";
import { ACCEPTED_FORMATS } from "@/lib/geometry/formats";
import { sniffHead } from "@/lib/geometry/io/sniff";
import { slabOptionsSchema, type SlabOptionsInput } from "@/lib/geometry/options";
import { mergeOptions, type TemplateVariableDef } from "@/lib/geometry/template";
import { API_UNITS, type ApiUnit } from "@/lib/geometry/units";
import { callbackProblem } from "@/lib/jobs/webhook";
import { versionForPlate } from "@/lib/templates/service";
import { plateValues, TemplateValueError } from "@/lib/templates/values";
import type { formatSchema } from "@/lib/validation/plates";
import type { NewPlate } from "./create";
import { titleFromParts } from "./name";

/** A part file an order brought, already streamed into the blob store. */
export type OrderFile = { name: string; key: string; size: number; head: Uint8Array; quantity: number; unit?: ApiUnit };

/**
 * An order for one plate, as typed data (the API's multipart form and the slab editor both make one):
 * either part files or a kit, the options sent, a template and its values, the file format wanted.
 */
export type PlateOrder = {
  kitId?: string;
  files?: OrderFile[];
  options: Record<string, unknown>;
  template?: { id: string; version?: number };
  variables: Record<string, string>;
  format: z.infer<typeof formatSchema>;
  callbackUrl?: string;
  /** The order system's own reference, kept on the plate. */
  reference?: string;
};

/** An order checked and resolved against the workspace: what the plate is made of, and how it is answered. */
export type PlateRequest = {
  spec: NewPlate;
  options: z.output<typeof slabOptionsSchema>;
  format: PlateOrder["format"];
  /** The order as sent ({date} left out: a retry the next morning is still the same request), for Idempotency-Key. */
  requestHash: string;
};

/**
 * Check an order and resolve it: the template version's options with the sent ones over them, checked
 * by the engine's schema; the kit's lines (the actor's own kit only); files plainly not meshes refused
 * from their first bytes (the worker's import says what is wrong with the rest); the callback address
 * checked; every value the plate is made with fixed, {date} included, so it can be made again exactly.
 */
export async function resolvePlateRequest(actor: WorkspaceActor, order: PlateOrder): Promise<PlateRequest> {
  const version = order.template ? await versionForPlate(actor, order.template.id, order.template.version) : null;
  const storedOptions = version
    ? mergeOptions(version.options as SlabOptionsInput, order.options as SlabOptionsInput)
    : (order.options as SlabOptionsInput);
  const parsed = slabOptionsSchema.safeParse(storedOptions);
  if (!parsed.success)
    throw new Invalid(
      "invalid_options",
      version ? "options over the template do not match the slab builder's options." : "options do not match the slab builder's options.",
      parsed.error.issues,
    );
  if (order.callbackUrl) {
    const problem = await callbackProblem(order.callbackUrl);
    if (problem)
      throw new Invalid(problem.code, problem.message, {
        reason: problem.reason,
        ...(problem.address ? { address: problem.address } : {}),
      });
  }

  const input: PlateInput = { parts: [] };
  // Named for its kit, or for the part files it holds ("gear, cube"), never a bare product name.
  let title = titleFromParts((order.files ?? []).map((f) => f.name));
  if (order.kitId) {
    const { kit, lines } = await kitForPlate(actor, order.kitId);
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
    for (const [i, f] of (order.files ?? []).entries()) {
      if (f.size === 0) throw new Invalid("empty", `${f.name}: the file is empty.`);
      if (!sniffHead(f.head, f.size) && !(f.size >= 84 && /\.stl$/i.test(f.name))) {
        throw new UnsupportedMedia(
          "not_a_mesh",
          `${f.name}: this is not a mesh file we recognise. Slabwright reads ${ACCEPTED_FORMATS.join(", ")}.`,
        );
      }
      input.parts.push({
        name: f.name || `part-${i + 1}.stl`,
        blobKey: f.key,
        quantity: f.quantity,
        ...(f.unit ? { unit: API_UNITS[f.unit] } : {}),
      });
    }
  }
  const today = new Date().toISOString().slice(0, 10);
  let variables: Record<string, string>;
  if (version) {
    try {
      variables = plateValues(version.variables as TemplateVariableDef[], order.variables, {
        date: today,
        kit: order.kitId ? title : undefined,
      });
    } catch (err) {
      if (err instanceof TemplateValueError) throw new Invalid(err.code, err.message, { variables: err.names });
      throw err;
    }
    input.templateId = version.templateId;
  } else {
    variables = { date: today, ...(order.kitId ? { kit: title } : {}), ...order.variables };
  }
  const sent = {
    options: order.options,
    template: order.template?.id ?? null,
    templateVersion: order.template?.version ?? null,
    variables: order.variables,
    reference: order.reference ?? null,
  };
  return {
    spec: {
      kitId: input.kitId ?? null,
      templateVersionId: version?.id ?? null,
      options: storedOptions as Record<string, unknown>,
      variables,
      input,
      title,
      reference: order.reference ?? null,
      pieceCount: input.parts.reduce((s, p) => s + p.quantity, 0) * parsed.data.layout.copies,
      callbackUrl: order.callbackUrl ?? null,
    },
    options: parsed.data,
    format: order.format,
    requestHash: createHash("sha256")
      .update(JSON.stringify({ input, request: sent, callbackUrl: order.callbackUrl ?? null }))
      .digest("hex"),
  };
}
