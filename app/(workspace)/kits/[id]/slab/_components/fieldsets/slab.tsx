"use client";

import type { ReactNode } from "react";
import { SLAB_SHAPE_IDS, SLAB_SHAPES } from "@/lib/geometry/slab-shapes";
import { Num, Pick, type Form } from "../fields";

/** The slab itself: its outline and its sizes. The layout fields follow it inside the same fieldset. */
export function SlabFieldset({ form, children }: { form: Form; children?: ReactNode }) {
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">Slab</legend>
      <Pick
        form={form}
        name="slab.shape"
        label="Outline"
        aria="Slab outline"
        options={SLAB_SHAPE_IDS.map((id) => [id, SLAB_SHAPES[id].label])}
      />
      <div className="grid grid-cols-2 gap-2">
        <Num form={form} name="slab.thickness" label="Thickness" unit="mm" step={0.1} />
        <Num form={form} name="slab.gap" label="Air gap" unit="mm" step={0.05} testId="opt-gap" />
        <Num form={form} name="slab.cornerRadius" label="Corner radius" unit="mm" step={0.5} />
        <Num form={form} name="slab.margin" label="Margin" unit="mm" step={0.5} />
      </div>
      {children}
    </fieldset>
  );
}
