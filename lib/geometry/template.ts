import { z } from "zod";
import { slabOptionsSchema, type SlabOptionsInput } from "./options";
import { placeholders } from "./variables";

/**
 * Templates: the slab builder's options plus named variables. The engine fills `{name}` placeholders
 * in text lines and the QR value; `{date}` (the plate's day, ISO 8601) and `{kit}` (the kit's name)
 * are always there. Everything here is pure, so the editor checks a template as it is typed and the
 * server checks it again when it is saved and when a plate uses it.
 */

export const BUILT_IN_VARIABLES = ["date", "kit"] as const;
const NAME = /^[a-z][a-z0-9_]*$/;

export const templateVariableSchema = z
  .object({
    name: z
      .string()
      .regex(NAME, "A variable's name is lower-case letters, digits and _ , starting with a letter (like order or customer_name)."),
    label: z.string().max(60).optional(),
    default: z.string().max(500).default(""),
    sample: z.string().max(500).default(""),
  })
  .strict();
export type TemplateVariableInput = z.input<typeof templateVariableSchema>;
export type TemplateVariableDef = z.output<typeof templateVariableSchema>;

/** Every placeholder the options use, in order of first use. */
export function usedPlaceholders(options: SlabOptionsInput): string[] {
  const values = [...(options.marks?.text ?? []).map((t) => t.value), options.marks?.qr?.value ?? ""];
  return [...new Set(values.flatMap((v) => placeholders(v)))];
}

export const templateBodySchema = z
  .object({
    options: slabOptionsSchema,
    variables: z.array(templateVariableSchema).max(20).default([]),
  })
  .superRefine((t, ctx) => {
    const names = new Set<string>();
    t.variables.forEach((v, i) => {
      if ((BUILT_IN_VARIABLES as readonly string[]).includes(v.name))
        ctx.addIssue({
          code: "custom",
          path: ["variables", i, "name"],
          message: `{${v.name}} is filled by Slabwright itself; choose another name.`,
        });
      if (names.has(v.name)) ctx.addIssue({ code: "custom", path: ["variables", i, "name"], message: `{${v.name}} is defined twice.` });
      names.add(v.name);
    });
    for (const name of usedPlaceholders(t.options)) {
      if (!names.has(name) && !(BUILT_IN_VARIABLES as readonly string[]).includes(name)) {
        ctx.addIssue({
          code: "custom",
          path: ["variables"],
          message:
            `The template uses {${name}}, which is not defined: add it as a variable (with a default and a sample value) or ` +
            `take it out of the text.`,
        });
      }
    }
  });
export type TemplateBody = z.output<typeof templateBodySchema>;

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };

/** Options over a template's: objects merge key by key, anything else (lists of text lines included) replaces. */
export function mergeOptions(base: SlabOptionsInput, over: SlabOptionsInput): SlabOptionsInput {
  const merge = (a: Json, b: Json): Json => {
    if (b === undefined) return a;
    if (a && b && typeof a === "object" && typeof b === "object" && !Array.isArray(a) && !Array.isArray(b)) {
      const out: Record<string, Json> = { ...a };
      for (const [k, v] of Object.entries(b)) out[k] = k in a ? merge(a[k]!, v) : v;
      return out;
    }
    return b;
  };
  return merge(base as Json, over as Json) as SlabOptionsInput;
}

/** What changed between two versions' options and variables, in words, for the version history. */
export function describeChanges(
  before: { options: SlabOptionsInput; variables: TemplateVariableInput[] } | null,
  after: { options: SlabOptionsInput; variables: TemplateVariableInput[] },
): string[] {
  if (!before) return ["first version"];
  const a = slabOptionsSchema.parse(before.options),
    b = slabOptionsSchema.parse(after.options);
  const out: string[] = [];
  const flat = (o: unknown, prefix = ""): Record<string, string> => {
    if (o && typeof o === "object" && !Array.isArray(o))
      return Object.assign({}, ...Object.entries(o).map(([k, v]) => flat(v, prefix ? `${prefix}.${k}` : k)));
    return { [prefix]: JSON.stringify(o) };
  };
  const { text: ta, logo: la, qr: qa, ...ma } = a.marks;
  const { text: tb, logo: lb, qr: qb, ...mb } = b.marks;
  const fa = flat({ ...a, marks: ma }),
    fb = flat({ ...b, marks: mb });
  for (const k of new Set([...Object.keys(fa), ...Object.keys(fb)])) {
    if (fa[k] !== fb[k]) out.push(`${k.replace(/^layout\.|^slab\./, "")}: ${fa[k] ?? "—"} → ${fb[k] ?? "—"}`);
  }
  const n = Math.max(ta.length, tb.length);
  for (let i = 0; i < n; i++) {
    if (JSON.stringify(ta[i]) === JSON.stringify(tb[i])) continue;
    if (!ta[i]) out.push(`text line ${i + 1} added: "${tb[i]!.value}"`);
    else if (!tb[i]) out.push(`text line ${i + 1} removed: "${ta[i]!.value}"`);
    else
      out.push(
        ta[i]!.value !== tb[i]!.value
          ? `text line ${i + 1}: "${ta[i]!.value}" → "${tb[i]!.value}"`
          : `text line ${i + 1}: size, face, relief or place changed`,
      );
  }
  if (JSON.stringify(qa) !== JSON.stringify(qb))
    out.push(
      !qa
        ? `QR code added: "${qb!.value}"`
        : !qb
          ? "QR code removed"
          : qa.value !== qb.value
            ? `QR code: "${qa.value}" → "${qb.value}"`
            : "QR code: size, level or place changed",
    );
  if (JSON.stringify(la) !== JSON.stringify(lb))
    out.push(
      !la
        ? `logo added (${lb!.name})`
        : !lb
          ? "logo removed"
          : la.name !== lb.name || JSON.stringify(la.paths) !== JSON.stringify(lb.paths)
            ? `logo replaced (${lb.name})`
            : "logo: size, relief or place changed",
    );
  const va = JSON.stringify(before.variables.map((v) => templateVariableSchema.parse(v))),
    vb = JSON.stringify(after.variables.map((v) => templateVariableSchema.parse(v)));
  if (va !== vb) out.push(`variables: ${after.variables.map((v) => `{${v.name}}`).join(", ") || "none"}`);
  return out.length ? out : ["no change to the options"];
}
