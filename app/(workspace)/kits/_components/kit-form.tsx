"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { useFieldArray, useForm, useWatch } from "react-hook-form";
import type { z } from "zod";
import { FormMessage } from "@/app/_components/form";
import { kitSchema, ORIENTATION_LABEL, ORIENTATIONS } from "@/lib/validation/kits";
import { saveKitAction } from "../actions";

type Values = z.input<typeof kitSchema>;

export function KitForm({ initial, parts }: { initial: Values; parts: { id: string; name: string }[] }) {
  const router = useRouter();
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const form = useForm<Values, unknown, z.output<typeof kitSchema>>({ resolver: zodResolver(kitSchema), defaultValues: initial });
  const lines = useFieldArray({ control: form.control, name: "lines" });
  const errors = form.formState.errors;
  const watched = useWatch({ control: form.control, name: "lines" });
  const pieces = (watched ?? []).reduce((s, l) => s + (Number(l.quantity) || 0), 0);

  const onSubmit = form.handleSubmit(async (values) => {
    setMessage(null);
    const res = await saveKitAction(values);
    if (!res.ok) {
      for (const [k, v] of Object.entries(res.fieldErrors ?? {})) if (v?.[0]) form.setError(k as "name", { message: v[0] });
      setMessage({ ok: false, text: res.message });
      return;
    }
    router.push("/kits");
    router.refresh();
  });

  if (parts.length === 0)
    return <p className="card p-6 text-sm text-muted">Upload parts first: a kit is made of parts from the library.</p>;
  return (
    <form onSubmit={onSubmit} className="card space-y-5 p-6" noValidate aria-label="Kit">
      <FormMessage message={message} />
      <div className="grid gap-4 sm:grid-cols-2">
        <div>
          <label htmlFor="kit-name" className="block text-sm font-bold">
            Name
          </label>
          <input id="kit-name" className="field-input mt-1" {...form.register("name")} aria-invalid={Boolean(errors.name)} />
          {errors.name ? <p className="mt-1 text-sm text-finding-error">{errors.name.message}</p> : null}
        </div>
        <div>
          <label htmlFor="kit-description" className="block text-sm font-bold">
            Description (optional)
          </label>
          <input id="kit-description" className="field-input mt-1" {...form.register("description")} />
        </div>
      </div>
      <fieldset>
        <legend className="text-sm font-bold">
          Parts in the kit · {pieces} {pieces === 1 ? "piece" : "pieces"} a set
        </legend>
        <div className="mt-2 space-y-2">
          {lines.fields.map((f, i) => (
            <div
              key={f.id}
              className="grid grid-cols-2 gap-2 rounded-card border border-hairline p-2 sm:grid-cols-[2fr_1fr_1fr_1.3fr_auto]"
              data-testid={`kit-line-${i}`}
            >
              <label className="text-xs text-muted">
                Part
                <select className="field-input mt-1" {...form.register(`lines.${i}.partId`)} aria-label={`Part of line ${i + 1}`}>
                  <option value="">Choose a part…</option>
                  {parts.map((p) => (
                    <option key={p.id} value={p.id}>
                      {p.name}
                    </option>
                  ))}
                </select>
              </label>
              <label className="text-xs text-muted">
                Quantity
                <input
                  type="number"
                  min={1}
                  className="field-input mt-1"
                  {...form.register(`lines.${i}.quantity`)}
                  aria-label={`Quantity of line ${i + 1}`}
                />
              </label>
              <label className="text-xs text-muted">
                Rotation (°)
                <input
                  type="number"
                  step="any"
                  className="field-input mt-1"
                  {...form.register(`lines.${i}.rotation`)}
                  aria-label={`Rotation of line ${i + 1}`}
                />
              </label>
              <label className="text-xs text-muted">
                Orientation
                <select
                  className="field-input mt-1"
                  {...form.register(`lines.${i}.orientation`)}
                  aria-label={`Orientation of line ${i + 1}`}
                >
                  {ORIENTATIONS.map((o) => (
                    <option key={o} value={o}>
                      {ORIENTATION_LABEL[o]}
                    </option>
                  ))}
                </select>
              </label>
              <button
                type="button"
                className="btn-quiet self-end px-2 py-2"
                onClick={() => lines.remove(i)}
                aria-label={`Remove line ${i + 1}`}
              >
                Remove
              </button>
              {errors.lines?.[i] ? (
                <p className="col-span-full text-sm text-finding-error">
                  {Object.values(errors.lines[i] ?? {})
                    .map((e) => (e as { message?: string })?.message)
                    .filter(Boolean)
                    .join(" ")}
                </p>
              ) : null}
            </div>
          ))}
        </div>
        {errors.lines?.message || errors.lines?.root?.message ? (
          <p className="mt-1 text-sm text-finding-error">{errors.lines.message ?? errors.lines.root?.message}</p>
        ) : null}
        <button
          type="button"
          className="btn-quiet mt-2"
          onClick={() => lines.append({ partId: "", quantity: 1, rotation: 0, orientation: "as-imported" })}
        >
          Add a part
        </button>
      </fieldset>
      <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
        {form.formState.isSubmitting ? "Saving…" : "Save kit"}
      </button>
    </form>
  );
}
