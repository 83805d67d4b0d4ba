"use client";

import { useToast } from "@/app/_components/toasts";
import type { SlabOptionsInput } from "@/lib/geometry/options";
import type { TemplateVariableDef } from "@/lib/geometry/template";
import type { FormValues } from "./form-model";
import { SaveTemplate } from "./save-template";

export type EditorTemplate = {
  id: string;
  name: string;
  version: number;
  starter: boolean;
  options: SlabOptionsInput;
  variables: TemplateVariableDef[];
};

/** Apply one of the workspace's templates (or none), and save the form as a template. */
export function TemplatePicker({
  templates,
  applied,
  onApply,
  values,
  canSave,
  onSaved,
  disabled = false,
}: {
  templates: EditorTemplate[];
  applied: EditorTemplate | null;
  onApply: (t: EditorTemplate | null) => void;
  values: FormValues;
  canSave: boolean;
  onSaved: (t: EditorTemplate) => void;
  disabled?: boolean;
}) {
  const toast = useToast();
  return (
    <section className="card space-y-2 p-3 text-sm" aria-label="Template">
      <label className="block text-xs text-muted">
        Template
        <select
          className="field-input mt-0.5 py-1 text-sm"
          aria-label="Apply a template"
          disabled={disabled}
          value={applied?.id ?? ""}
          onChange={(e) => {
            const t = templates.find((x) => x.id === e.target.value) ?? null;
            onApply(t);
            if (t) toast("note", `“${t.name}” (version ${t.version}) applied: its options are in the form, its sample values below.`);
          }}
        >
          <option value="">none — options of my own</option>
          {templates.map((t) => (
            <option key={t.id} value={t.id}>
              {t.name} · v{t.version}
              {t.starter ? " · starter" : ""}
            </option>
          ))}
        </select>
      </label>
      {canSave ? <SaveTemplate values={values} applied={applied} onSaved={onSaved} /> : null}
    </section>
  );
}
