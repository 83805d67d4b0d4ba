import { BUILT_IN_VARIABLES, type TemplateVariableDef } from "@/lib/geometry/template";

/**
 * The one way a template's variables get their values, pure so the slab editor, the template
 * thumbnails and the plate path (API, editor, make again) all fill them alike.
 *
 * For each variable: the value given (a blank one counts as not given, so clearing a field falls
 * back instead of engraving nothing), else for a preview its sample value, else its default. A plate
 * made for an order never takes a sample value: "Sam" is a stand-in, not a customer. `{date}` and
 * `{kit}` are filled from `builtIns` unless given.
 */
export type ValuesFor = "preview" | "plate";

export type ResolvedValues = {
  values: Record<string, string>;
  /** Variables with no value at all (none given, no default, and for a preview no sample either). */
  missing: string[];
  /** Names given that the template has no variable for (nor a built-in). */
  unknown: string[];
};

const given = (v: string | undefined) => (v !== undefined && v.trim() !== "" ? v : undefined);

export function resolveTemplateValues(
  defs: readonly Pick<TemplateVariableDef, "name" | "default" | "sample">[],
  values: Record<string, string>,
  opts: { for: ValuesFor; date: string; kit?: string },
): ResolvedValues {
  const known = new Set<string>([...defs.map((d) => d.name), ...BUILT_IN_VARIABLES]);
  const unknown = Object.keys(values).filter((k) => !known.has(k));
  const kit = given(values.kit) ?? opts.kit;
  const out: Record<string, string> = { date: given(values.date) ?? opts.date, ...(kit !== undefined ? { kit } : {}) };
  const missing: string[] = [];
  for (const d of defs) {
    const v = given(values[d.name]) ?? (opts.for === "preview" ? given(d.sample) : undefined) ?? given(d.default);
    if (v === undefined) missing.push(d.name);
    else out[d.name] = v;
  }
  return { values: out, missing, unknown };
}

/** A template thumbnail's values: a preview's, and a variable with neither sample nor default shows its own name. */
export function thumbnailValues(
  defs: readonly Pick<TemplateVariableDef, "name" | "default" | "sample">[],
  date: string,
): Record<string, string> {
  const r = resolveTemplateValues(defs, {}, { for: "preview", date, kit: "Sample kit" });
  return { ...Object.fromEntries(r.missing.map((n) => [n, n])), ...r.values };
}

const braced = (names: readonly string[]) => names.map((n) => `{${n}}`).join(", ");

export class TemplateValueError extends Error {
  constructor(
    readonly code: "missing_variable" | "unknown_variable",
    message: string,
    readonly names: string[],
  ) {
    super(message);
    this.name = "TemplateValueError";
  }
}

/**
 * The values a plate is made with (`resolveTemplateValues` for a plate), refusing a name the
 * template does not have (a typo would otherwise be silently ignored) and a variable left without a
 * value and without a default.
 */
export function plateValues(
  defs: readonly Pick<TemplateVariableDef, "name" | "default" | "sample">[],
  values: Record<string, string>,
  builtIns: { date: string; kit?: string },
): Record<string, string> {
  const r = resolveTemplateValues(defs, values, { for: "plate", ...builtIns });
  if (r.unknown.length) {
    const known = [...defs.map((d) => d.name), ...BUILT_IN_VARIABLES];
    throw new TemplateValueError(
      "unknown_variable",
      `The template has no variable${r.unknown.length > 1 ? "s" : ""} ${braced(r.unknown)}; it has ${braced(known)}.`,
      r.unknown,
    );
  }
  if (r.missing.length)
    throw new TemplateValueError(
      "missing_variable",
      `Give a value for ${braced(r.missing)}: the template has no default for ${r.missing.length > 1 ? "them" : "it"}.`,
      r.missing,
    );
  return r.values;
}
