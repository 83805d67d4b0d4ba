"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useId, useState } from "react";
import { useFieldArray, useForm, useWatch } from "react-hook-form";
import { z } from "zod";
import { useToast } from "@/app/_components/toasts";
import { templateBodySchema, type TemplateVariableDef } from "@/lib/geometry/template";
import { createTemplateAction, saveTemplateVersionAction } from "../../../../templates/actions";
import { formToOptions, valuePlaceholders, type FormValues } from "./form-model";
import type { EditorTemplate } from "./template-picker";

const saveSchema = z.object({
  mode: z.enum(["new", "version"]),
  name: z.string().trim().max(80, "At most 80 characters."),
  description: z.string().trim().max(500, "At most 500 characters."),
  note: z.string().trim().max(200, "At most 200 characters."),
  variables: z.array(z.object({ name: z.string(), label: z.string().max(60), default: z.string().max(500), sample: z.string().max(500) })),
});
type SaveForm = z.infer<typeof saveSchema>;

/**
 * "Save as a template": the editor's options (without hand placements, which belong to a kit) and
 * one variable per placeholder in use, each with a default and a sample value. Saving over an applied
 * template of this workspace adds a version.
 */
export function SaveTemplate({
  values,
  applied,
  onSaved,
}: {
  values: FormValues;
  applied: EditorTemplate | null;
  onSaved: (t: EditorTemplate) => void;
}) {
  const [open, setOpen] = useState(false);
  const id = useId();
  const toast = useToast();
  const router = useRouter();
  const [problem, setProblem] = useState<string | null>(null);
  const names = valuePlaceholders(values);
  const canVersion = Boolean(applied && !applied.starter);
  const form = useForm<SaveForm>({
    resolver: zodResolver(saveSchema),
    defaultValues: { mode: canVersion ? "version" : "new", name: "", description: "", note: "", variables: [] },
  });
  const vars = useFieldArray({ control: form.control, name: "variables" });
  // One row per placeholder in use, made when the form opens; a template's own definitions (label, default) are kept.
  const openForm = () => {
    const known = new Map<string, TemplateVariableDef>((applied?.variables ?? []).map((v) => [v.name, v]));
    const current = new Map(form.getValues("variables").map((v) => [v.name, v]));
    form.setValue(
      "variables",
      names.map(
        (n) =>
          current.get(n) ?? {
            name: n,
            label: known.get(n)?.label ?? "",
            default: known.get(n)?.default ?? "",
            sample: values.samples?.[n] ?? known.get(n)?.sample ?? "",
          },
      ),
    );
    // Once a template of this workspace is applied (or just saved), a new version of it is the first choice.
    form.setValue("mode", canVersion ? "version" : "new");
    setOpen(true);
  };
  const mode = useWatch({ control: form.control, name: "mode" });

  const submit = form.handleSubmit(async (f) => {
    setProblem(null);
    if (f.mode === "new" && !f.name) return form.setError("name", { message: "Give the template a name." });
    const body = {
      options: formToOptions(values),
      variables: f.variables.map((v) => ({ name: v.name, ...(v.label ? { label: v.label } : {}), default: v.default, sample: v.sample })),
    };
    // The server checks again with the same schema; checking here says it at once.
    const check = templateBodySchema.safeParse(body);
    if (!check.success) return setProblem(check.error.issues[0]!.message);
    const r =
      f.mode === "version" && applied
        ? await saveTemplateVersionAction({ id: applied.id, body, note: f.note })
        : await createTemplateAction({ name: f.name, description: f.description, body });
    if (!r.ok) {
      // A name the workspace already has is said at the name field.
      const nameError = r.fieldErrors?.name?.[0];
      if (nameError && f.mode === "new") form.setError("name", { message: nameError }, { shouldFocus: true });
      else setProblem(r.message);
      return;
    }
    toast("done", r.message ?? "Template saved.");
    const saved = r.data as { id: string; version: number };
    onSaved({
      id: saved.id,
      name: f.mode === "version" && applied ? applied.name : f.name,
      version: saved.version,
      starter: false,
      options: body.options,
      variables: check.data.variables,
    });
    setOpen(false);
    router.refresh();
  });

  if (!open) {
    return (
      <button type="button" className="btn-quiet w-full px-2 py-1 text-xs" onClick={openForm}>
        Save as a template…
      </button>
    );
  }
  return (
    <form className="space-y-2 rounded-card border border-hairline p-2" onSubmit={submit} aria-label="Save as a template">
      {canVersion ? (
        <fieldset className="space-y-1 text-xs">
          <legend className="sr-only">Save as</legend>
          <label className="flex items-center gap-1.5">
            <input type="radio" value="version" {...form.register("mode")} /> version {applied!.version + 1} of “{applied!.name}”
          </label>
          <label className="flex items-center gap-1.5">
            <input type="radio" value="new" {...form.register("mode")} /> a new template
          </label>
        </fieldset>
      ) : null}
      {mode === "new" ? (
        <>
          <div className="text-xs text-muted">
            <label htmlFor={`${id}-name`}>Template name</label>
            <input
              id={`${id}-name`}
              className="field-input mt-0.5 py-1 text-sm"
              {...form.register("name")}
              aria-invalid={Boolean(form.formState.errors.name)}
              aria-describedby={form.formState.errors.name ? `${id}-name-error` : undefined}
            />
            {form.formState.errors.name ? (
              <span id={`${id}-name-error`} className="mt-0.5 block text-finding-error" data-testid="template-name-error">
                {form.formState.errors.name.message}
              </span>
            ) : null}
          </div>
          <div className="text-xs text-muted">
            <label htmlFor={`${id}-desc`}>Description (optional)</label>
            <input id={`${id}-desc`} className="field-input mt-0.5 py-1 text-sm" {...form.register("description")} />
          </div>
        </>
      ) : (
        <div className="text-xs text-muted">
          <label htmlFor={`${id}-note`}>What changed (optional)</label>
          <input id={`${id}-note`} className="field-input mt-0.5 py-1 text-sm" {...form.register("note")} />
        </div>
      )}
      <div className="space-y-1.5">
        <p className="text-xs font-bold">Variables</p>
        {vars.fields.length === 0 ? (
          <p className="text-xs text-muted">No placeholders in the text or QR: the template fills nothing per order.</p>
        ) : null}
        {/* Stacked in the editor's narrow column, side by side where the form has room: the values stay readable. */}
        {vars.fields.map((v, i) => (
          <fieldset key={v.id} className="@container rounded-card border border-hairline p-1.5 text-xs text-muted">
            <legend className="px-0.5 font-mono text-ink">{`{${v.name}}`}</legend>
            <div className="grid grid-cols-1 gap-1 @sm:grid-cols-3">
              <label className="min-w-0">
                label
                <input
                  className="field-input mt-0.5 px-2 py-1 text-sm"
                  aria-label={`Label for {${v.name}}`}
                  placeholder="e.g. Order number"
                  {...form.register(`variables.${i}.label`)}
                />
              </label>
              <label className="min-w-0">
                default
                <input
                  className="field-input mt-0.5 px-2 py-1 text-sm"
                  aria-label={`Default for {${v.name}}`}
                  {...form.register(`variables.${i}.default`)}
                />
              </label>
              <label className="min-w-0">
                sample
                <input
                  className="field-input mt-0.5 px-2 py-1 text-sm"
                  aria-label={`Sample for {${v.name}}`}
                  {...form.register(`variables.${i}.sample`)}
                />
              </label>
            </div>
          </fieldset>
        ))}
        <p className="text-xs text-muted">An empty default makes the value required for every plate.</p>
      </div>
      {problem ? (
        <p className="text-xs text-finding-error" role="alert" data-testid="save-template-error">
          {problem}
        </p>
      ) : null}
      <div className="flex gap-2">
        <button type="submit" className="btn-primary px-3 py-1 text-xs" disabled={form.formState.isSubmitting}>
          Save the template
        </button>
        <button type="button" className="btn-quiet px-3 py-1 text-xs" onClick={() => setOpen(false)}>
          Cancel
        </button>
      </div>
    </form>
  );
}
