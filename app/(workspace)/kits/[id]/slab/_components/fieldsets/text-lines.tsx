"use client";

import { useContext } from "react";
import { useFieldArray, useWatch } from "react-hook-form";
import type { TextFit } from "@/lib/geometry/options";
import { FACES, FieldNotesContext, Num, Pick, RELIEF, Text, WHERE, type Form } from "../fields";
import { newLine } from "../form-model";

/** What the engine does with a line longer than its room (see lib/geometry/text-fit.ts). */
const FIT: [TextFit, string][] = [
  ["shrink", "Shrink it to fit"],
  ["refuse", "Refuse the plate"],
];

/** The schema takes at most six text lines. */
const MAX_LINES = 6;

/** Text lines: each with its size, face, relief, depth, place, longest width and what to do when too long. */
export function TextLinesFieldset({ form }: { form: Form }) {
  const lines = useFieldArray({ control: form.control, name: "text" });
  const text = useWatch({ control: form.control, name: "text" });
  // A number field with the engine's words under it takes the whole row, so a long note reads as prose.
  const notes = useContext(FieldNotesContext);
  const wide = (i: number, field: string) => (notes.get(`text.${i}.${field}`)?.length ? "col-span-2" : "");
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">Text</legend>
      {lines.fields.length === 0 ? (
        <p className="text-xs text-muted">No text on the slab. Add a line for an order number or a thank-you.</p>
      ) : null}
      {lines.fields.map((f, i) => (
        <div key={f.id} className="space-y-1.5 rounded-card border border-hairline p-2">
          <div className="flex items-end gap-1">
            <div className="grow">
              <Text form={form} name={`text.${i}.value`} label={`Text line ${i + 1}`} />
            </div>
            <button
              type="button"
              className="btn-quiet px-2 py-1 text-xs"
              onClick={() => lines.remove(i)}
              aria-label={`Remove line ${i + 1}`}
              title="Remove this line"
            >
              ✕
            </button>
          </div>
          <div className="grid grid-cols-2 gap-2">
            <Num form={form} name={`text.${i}.size`} label="Cap height" unit="mm" step={0.5} className={wide(i, "size")} />
            <Pick form={form} name={`text.${i}.font`} label="Face" options={FACES} />
            <Pick form={form} name={`text.${i}.relief`} label="Relief" options={RELIEF} />
            <Num form={form} name={`text.${i}.depth`} label={text[i]?.relief === "emboss" ? "Height" : "Depth"} unit="mm" step={0.1} />
            <Pick form={form} name={`text.${i}.where`} label="Place" options={WHERE} />
            <Num form={form} name={`text.${i}.maxWidth`} label="Max width" unit="mm" step={1} className={wide(i, "maxWidth")} />
          </div>
          <Pick form={form} name={`text.${i}.fit`} label="If the line is too long" options={FIT} />
          {text[i]?.where === "at" ? (
            <div className="grid grid-cols-2 gap-2">
              <Num form={form} name={`text.${i}.x`} label="x" unit="mm" step={0.5} />
              <Num form={form} name={`text.${i}.y`} label="y" unit="mm" step={0.5} />
            </div>
          ) : null}
        </div>
      ))}
      <button
        type="button"
        className="btn-quiet px-2 py-1 text-xs"
        disabled={lines.fields.length >= MAX_LINES}
        onClick={() => lines.append(newLine("", 4))}
      >
        Add a text line
      </button>
    </fieldset>
  );
}
