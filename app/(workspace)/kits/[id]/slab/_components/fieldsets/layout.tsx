"use client";

import { useWatch } from "react-hook-form";
import { Num, Pick, type Form } from "../fields";
import { BEDS, bedKey } from "../form-model";

const BED_CHOICES: [string, string][] = [
  ...BEDS.map(([w, d]) => [bedKey(w, d), `${w} × ${d} mm`] as [string, string]),
  ["custom", "custom size"],
];

/** How the pieces are laid out: spacing, copies of the kit and the bed (a preset or a custom size). */
export function LayoutFields({ form }: { form: Form }) {
  const bed = useWatch({ control: form.control, name: "bed" });
  return (
    <>
      <div className="grid grid-cols-2 gap-2">
        <Num form={form} name="spacing" label="Spacing" unit="mm" step={0.5} testId="opt-spacing" />
        <Num form={form} name="copies" label="Copies of the kit" step={1} />
      </div>
      <Pick form={form} name="bed" label="Bed" aria="Bed" options={BED_CHOICES} />
      {bed === "custom" ? (
        <div className="grid grid-cols-2 gap-2">
          <Num form={form} name="bedWidth" label="Bed width" unit="mm" step={1} />
          <Num form={form} name="bedDepth" label="Bed depth" unit="mm" step={1} />
        </div>
      ) : null}
    </>
  );
}
