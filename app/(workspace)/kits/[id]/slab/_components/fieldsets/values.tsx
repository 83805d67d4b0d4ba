"use client";

import { useWatch, type Path } from "react-hook-form";
import { Text, type Form } from "../fields";
import { valuePlaceholders, type FormValues } from "../form-model";

/** The values that fill the {placeholders} in use, for the preview and the plate. */
export function ValuesFieldset({ form, missing, fallbacks }: { form: Form; missing: string[]; fallbacks: Record<string, string> }) {
  const [text, qr] = useWatch({ control: form.control, name: ["text", "qr"] });
  const names = valuePlaceholders({ text, qr });
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">Values</legend>
      <p className="text-xs text-muted">
        What fills the {"{placeholders}"} in the preview and on the plate; {"{date}"} is today and {"{kit}"} the kit&apos;s name.
      </p>
      {names.length === 0 ? <p className="text-xs text-muted">No placeholders in the text or the QR code.</p> : null}
      <div className="grid grid-cols-2 gap-2">
        {names.map((n) => (
          <Text
            key={n}
            form={form}
            name={`samples.${n}` as Path<FormValues>}
            label={`{${n}}`}
            placeholder={fallbacks[n] ? `${fallbacks[n]} (the template's)` : undefined}
          />
        ))}
      </div>
      {missing.length ? (
        <p className="text-xs text-finding-warning" data-testid="values-missing">
          ⚠ {missing.map((n) => `{${n}}`).join(", ")} {missing.length > 1 ? "have" : "has"} no value and no default: give one to make the
          plate.
        </p>
      ) : null}
    </fieldset>
  );
}
