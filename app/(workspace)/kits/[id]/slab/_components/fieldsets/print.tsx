"use client";

import { MATERIALS } from "@/lib/geometry/options";
import { Num, Pick, type Form } from "../fields";

const MATERIAL_CHOICES = Object.keys(MATERIALS).map((m) => [m, m] as [string, string]);

/** The printer and the material: nozzle, layer heights, and the filament's price for the estimate. */
export function PrintFieldset({ form }: { form: Form }) {
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">Print</legend>
      <div className="grid grid-cols-2 gap-2">
        <Pick form={form} name="material" label="Material" aria="Material" options={MATERIAL_CHOICES} />
        <Num form={form} name="nozzle" label="Nozzle" unit="mm" step={0.1} />
        <Num form={form} name="layerHeight" label="Layer height" unit="mm" step={0.02} />
        <Num form={form} name="firstLayerHeight" label="First layer" unit="mm" step={0.02} />
        <Num form={form} name="pricePerKg" label="Filament price per kg" unit="€" step={1} className="col-span-2" />
      </div>
    </fieldset>
  );
}
