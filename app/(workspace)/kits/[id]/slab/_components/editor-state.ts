import { slabOptionsSchema } from "@/lib/geometry/options";
import type { KitSlabSettings } from "@/lib/validation/kits";
import { resolveTemplateValues } from "@/lib/templates/values";
import { DEFAULT_VALUES, formToOptions, optionsToForm, type FormValues } from "./form-model";
import type { Layout } from "./layout-history";
import type { EditorTemplate } from "./template-picker";

/**
 * What the slab editor holds, without React: the options form's values, the hand layout and the
 * template applied. Undo and redo step through these; the kit keeps the newest as its slab settings.
 */
export type EditorState = { values: FormValues; placements: Layout; applied: EditorTemplate | null };

/** The Values fields for a template: each variable's sample, else its default (what a preview shows). */
export function templateSamples(t: Pick<EditorTemplate, "variables">): FormValues["samples"] {
  const r = resolveTemplateValues(t.variables, {}, { for: "preview", date: "" });
  return Object.fromEntries(t.variables.map((v) => [v.name, r.values[v.name] ?? ""]));
}

export const templateForm = (t: EditorTemplate): FormValues => optionsToForm(t.options, templateSamples(t));

/**
 * Where the editor opens: a template named in the address (the designer asked for it), else the
 * kit's saved settings, else the defaults. A saved template that is gone leaves its options in the
 * form, without the template.
 */
export function editorStart(templates: EditorTemplate[], saved: KitSlabSettings | null, templateId?: string): EditorState {
  const asked = templateId ? templates.find((t) => t.id === templateId) : undefined;
  if (asked) return { values: templateForm(asked), placements: undefined, applied: asked };
  if (saved) {
    const placements = slabOptionsSchema.parse(saved.options).layout.placements;
    return {
      values: optionsToForm(saved.options, saved.samples),
      placements,
      applied: (saved.template && templates.find((t) => t.id === saved.template!.id)) || null,
    };
  }
  return { values: DEFAULT_VALUES, placements: undefined, applied: null };
}

/** The settings a kit keeps for a state, or null while the form holds something the engine refuses. */
export function settingsOf(s: EditorState): KitSlabSettings | null {
  const options = formToOptions(s.values, s.placements);
  if (!slabOptionsSchema.safeParse(options).success) return null;
  return {
    options,
    samples: Object.fromEntries(Object.entries(s.values.samples ?? {}).filter(([, v]) => typeof v === "string")),
    template: s.applied ? { id: s.applied.id, version: s.applied.version } : null,
  };
}

/** Two form states alike (number fields left empty hold NaN, which compares alike here too). */
export const sameValues = (a: FormValues, b: FormValues) => JSON.stringify(a) === JSON.stringify(b);
