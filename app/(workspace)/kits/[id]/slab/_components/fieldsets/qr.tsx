"use client";

import { useWatch } from "react-hook-form";
import { Num, Pick, RELIEF, Text, WHERE, type Form } from "../fields";

const LEVELS: [string, string][] = [
  ["L", "L (7 %)"],
  ["M", "M (15 %)"],
  ["Q", "Q (25 %)"],
  ["H", "H (30 %)"],
];

/** The QR code: what it says, then (once it says something) its module, error correction and place. */
export function QrFieldset({ form }: { form: Form }) {
  const qr = useWatch({ control: form.control, name: "qr" });
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">QR code</legend>
      <div className="text-xs text-muted">
        <Text form={form} name="qr.value" label="QR code says (empty: none)" aria="QR value" placeholder="https://shop.example/o/{order}" />
      </div>
      {qr.value ? (
        <div className="grid grid-cols-2 gap-2">
          <Num form={form} name="qr.module" label="Module" unit="mm" step={0.1} />
          <Pick form={form} name="qr.level" label="Error correction" options={LEVELS} />
          <Pick form={form} name="qr.relief" label="Relief" options={RELIEF} />
          <Num form={form} name="qr.depth" label={qr.relief === "emboss" ? "Height" : "Depth"} unit="mm" step={0.1} />
          <Pick form={form} name="qr.where" label="Place" options={WHERE} />
          <Num form={form} name="qr.maxSize" label="Max size" unit="mm" step={1} />
          {qr.where === "at" ? (
            <>
              <Num form={form} name="qr.x" label="x" unit="mm" step={0.5} />
              <Num form={form} name="qr.y" label="y" unit="mm" step={0.5} />
            </>
          ) : null}
        </div>
      ) : null}
    </fieldset>
  );
}
