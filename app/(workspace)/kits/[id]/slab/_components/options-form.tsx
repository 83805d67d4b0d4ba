"use client";

import { createContext, useContext, useId, useState } from "react";
import { get, useFieldArray, type FieldErrors, type Path, type Resolver, type UseFormReturn } from "react-hook-form";
import { ENGRAVING_FONTS } from "@/lib/geometry/fonts";
import { importSvgLogo, LogoError } from "@/lib/geometry/marks/logo";
import { MATERIALS } from "@/lib/geometry/options";
import { BEDS, formProblems, newLine as line, valuePlaceholders, type FieldNotes, type FormValues, type Relief, type Where } from "./form-model";

/**
 * The slab editor's options form: react-hook-form over the form model (form-model.ts), checked by
 * the engine's own zod schema, whose messages are shown at their fields.
 */

export const FieldNotesContext = createContext<FieldNotes>(new Map());

function Notes({ name, id }: { name: string; id: string }) {
  const notes = useContext(FieldNotesContext).get(name);
  if (!notes?.length) return null;
  return (
    <>
      {notes.map((n) => (
        <span key={n.code} id={`${id}-n-${n.code}`} data-testid={`field-note-${n.code}`} className={`mt-0.5 block whitespace-normal ${n.severity === "error" ? "text-finding-error" : "text-finding-warning"}`}>
          {n.severity === "error" ? "✕ " : "⚠ "}
          {n.message}
        </span>
      ))}
    </>
  );
}

/** The engine's schema as the form's resolver: one check, one set of messages, at their fields. */
export const slabResolver: Resolver<FormValues> = async (values) => {
  const problems = formProblems(values);
  if (!problems.length) return { values, errors: {} };
  const errors: Record<string, unknown> = {};
  for (const { path, type, message } of problems) {
    if (get(errors, path)) continue;
    let node = errors;
    const keys = path.split(".");
    keys.forEach((k, i) => {
      if (i === keys.length - 1) node[k] = { type, message };
      else node = (node[k] ??= {}) as Record<string, unknown>;
    });
  }
  return { values: {}, errors: errors as FieldErrors<FormValues> };
};

const input = "field-input mt-0.5 py-1 text-sm";

function Num({ form, name, label, unit, step, testId }: { form: UseFormReturn<FormValues>; name: Path<FormValues>; label: string; unit?: string; step: number; testId?: string }) {
  const id = `${useId()}-${name}`;
  const error = (get(form.formState.errors, name) as { message?: string } | undefined)?.message;
  return (
    <div className="text-xs text-muted">
      <label htmlFor={id}>
        {label}
        {unit ? <span className="ml-1">({unit})</span> : null}
      </label>
      <input id={id} type="number" inputMode="decimal" step={step} className={input} aria-invalid={Boolean(error)} aria-describedby={error ? `${id}-e` : undefined} data-testid={testId} {...form.register(name, { valueAsNumber: true })} />
      {error ? (
        <span id={`${id}-e`} className="mt-0.5 block text-finding-error">
          {error}
        </span>
      ) : (
        <Notes name={name} id={id} />
      )}
    </div>
  );
}

function Pick({ form, name, label, options, aria }: { form: UseFormReturn<FormValues>; name: Path<FormValues>; label: string; options: [string, string][]; aria?: string }) {
  const id = `${useId()}-${name}`;
  return (
    <div className="text-xs text-muted">
      <label htmlFor={id}>{label}</label>
      <select id={id} className={input} aria-label={aria} {...form.register(name)}>
        {options.map(([v, l]) => (
          <option key={v} value={v}>
            {l}
          </option>
        ))}
      </select>
      <Notes name={name} id={id} />
    </div>
  );
}

function Text({ form, name, label, placeholder, aria }: { form: UseFormReturn<FormValues>; name: Path<FormValues>; label: string; placeholder?: string; aria?: string }) {
  const id = `${useId()}-${name}`;
  const error = (get(form.formState.errors, name) as { message?: string } | undefined)?.message;
  return (
    <div className="text-xs text-muted">
      <label htmlFor={id}>{label}</label>
      <input id={id} className={input} placeholder={placeholder} aria-label={aria} aria-invalid={Boolean(error)} {...form.register(name)} />
      {error ? <span className="mt-0.5 block text-finding-error">{error}</span> : <Notes name={name} id={id} />}
    </div>
  );
}

function LogoFields({ form }: { form: UseFormReturn<FormValues> }) {
  const logo = form.watch("logo");
  const id = useId();
  const [problem, setProblem] = useState<string | null>(null);
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">Logo</legend>
      <div className="text-xs text-muted">
        <label htmlFor={`${id}-file`}>{logo ? `“${logo.name}” — replace with another SVG` : "SVG drawing (outlines only)"}</label>
        <input
          id={`${id}-file`}
          type="file"
          accept=".svg,image/svg+xml"
          className="mt-0.5 block w-full text-xs"
          aria-describedby={problem ? `${id}-e` : undefined}
          onChange={async (e) => {
            const file = e.target.files?.[0];
            e.target.value = "";
            if (!file) return;
            try {
              const parsed = importSvgLogo(new Uint8Array(await file.arrayBuffer()));
              setProblem(null);
              form.setValue("logo", { name: file.name.replace(/\.svg$/i, ""), paths: parsed.paths, box: parsed.box, width: logo?.width ?? 20, relief: logo?.relief ?? "engrave", depth: logo?.depth ?? 0.4, where: logo?.where ?? "auto", x: 0, y: 0 }, { shouldDirty: true, shouldValidate: true });
            } catch (err) {
              setProblem(err instanceof LogoError ? err.message : "The file could not be read as SVG.");
            }
          }}
        />
        {problem ? (
          <span id={`${id}-e`} role="alert" className="mt-0.5 block text-finding-error" data-testid="logo-error">
            {problem}
          </span>
        ) : null}
      </div>
      {logo ? (
        <div className="grid grid-cols-2 gap-2">
          <Num form={form} name="logo.width" label="Logo width" unit="mm" step={1} />
          <Pick form={form} name="logo.relief" label="Relief" options={RELIEF} />
          <Num form={form} name="logo.depth" label={logo.relief === "emboss" ? "Height" : "Depth"} unit="mm" step={0.1} />
          <Pick form={form} name="logo.where" label="Place" options={WHERE} />
          {logo.where === "at" ? (
            <>
              <Num form={form} name="logo.x" label="x" unit="mm" step={0.5} />
              <Num form={form} name="logo.y" label="y" unit="mm" step={0.5} />
            </>
          ) : null}
          <button type="button" className="btn-quiet col-span-2 px-2 py-1 text-xs" onClick={() => form.setValue("logo", null, { shouldDirty: true })}>
            Remove the logo
          </button>
        </div>
      ) : null}
    </fieldset>
  );
}

const WHERE: [Where, string][] = [["auto", "auto"], ["top", "above"], ["bottom", "below"], ["at", "at x / y"]];
const RELIEF: [Relief, string][] = [["engrave", "engraved"], ["emboss", "embossed"]];
const FACES = Object.entries(ENGRAVING_FONTS).map(([id, f]) => [id, f.label] as [string, string]);

export function OptionsFields({ form }: { form: UseFormReturn<FormValues> }) {
  const lines = useFieldArray({ control: form.control, name: "text" });
  const v = form.watch();
  return (
    <>
      <fieldset className="space-y-2">
        <legend className="font-bold">Slab</legend>
        <Pick form={form} name="slab.shape" label="Outline" aria="Slab outline" options={[["rounded-rect", "rounded rectangle"], ["disc", "disc"], ["contour", "follows the pieces"]]} />
        <div className="grid grid-cols-2 gap-2">
          <Num form={form} name="slab.thickness" label="Thickness" unit="mm" step={0.1} />
          <Num form={form} name="slab.gap" label="Air gap" unit="mm" step={0.05} testId="opt-gap" />
          <Num form={form} name="slab.cornerRadius" label="Corner radius" unit="mm" step={0.5} />
          <Num form={form} name="slab.margin" label="Margin" unit="mm" step={0.5} />
          <Num form={form} name="spacing" label="Spacing" unit="mm" step={0.5} testId="opt-spacing" />
          <Num form={form} name="copies" label="Copies of the kit" step={1} />
        </div>
        <Pick form={form} name="bed" label="Bed" aria="Bed" options={[...BEDS.map(([w, d]) => [`${w}x${d}`, `${w} × ${d} mm`] as [string, string]), ["custom", "custom size"]]} />
        {v.bed === "custom" ? (
          <div className="grid grid-cols-2 gap-2">
            <Num form={form} name="bedWidth" label="Bed width" unit="mm" step={1} />
            <Num form={form} name="bedDepth" label="Bed depth" unit="mm" step={1} />
          </div>
        ) : null}
      </fieldset>
      <fieldset className="space-y-2">
        <legend className="font-bold">Print</legend>
        <div className="grid grid-cols-2 gap-2">
          <Pick form={form} name="material" label="Material" aria="Material" options={Object.keys(MATERIALS).map((m) => [m, m])} />
          <Num form={form} name="nozzle" label="Nozzle" unit="mm" step={0.1} />
          <Num form={form} name="layerHeight" label="Layer height" unit="mm" step={0.02} />
          <Num form={form} name="firstLayerHeight" label="First layer" unit="mm" step={0.02} />
          <Num form={form} name="pricePerKg" label="Filament price per kg" step={1} />
        </div>
      </fieldset>
      <fieldset className="space-y-2">
        <legend className="font-bold">Text</legend>
        {lines.fields.length === 0 ? <p className="text-xs text-muted">No text on the slab. Add a line for an order number or a thank-you.</p> : null}
        {lines.fields.map((f, i) => (
          <div key={f.id} className="space-y-1.5 rounded-card border border-hairline p-2">
            <div className="flex items-end gap-1">
              <div className="grow">
                <Text form={form} name={`text.${i}.value`} label={`Text line ${i + 1}`} />
              </div>
              <button type="button" className="btn-quiet px-2 py-1 text-xs" onClick={() => lines.remove(i)} aria-label={`Remove line ${i + 1}`} title="Remove this line">
                ✕
              </button>
            </div>
            <div className="grid grid-cols-2 gap-2">
              <Num form={form} name={`text.${i}.size`} label="Cap height" unit="mm" step={0.5} />
              <Pick form={form} name={`text.${i}.font`} label="Face" options={FACES} />
              <Pick form={form} name={`text.${i}.relief`} label="Relief" options={RELIEF} />
              <Num form={form} name={`text.${i}.depth`} label={v.text[i]?.relief === "emboss" ? "Height" : "Depth"} unit="mm" step={0.1} />
              <Pick form={form} name={`text.${i}.where`} label="Place" options={WHERE} />
              <Num form={form} name={`text.${i}.maxWidth`} label="Max width" unit="mm" step={1} />
            </div>
            {v.text[i]?.where === "at" ? (
              <div className="grid grid-cols-2 gap-2">
                <Num form={form} name={`text.${i}.x`} label="x" unit="mm" step={0.5} />
                <Num form={form} name={`text.${i}.y`} label="y" unit="mm" step={0.5} />
              </div>
            ) : null}
          </div>
        ))}
        <button type="button" className="btn-quiet px-2 py-1 text-xs" disabled={lines.fields.length >= 6} onClick={() => lines.append(line("", 4))}>
          Add a text line
        </button>
      </fieldset>
      <fieldset className="space-y-2">
        <legend className="font-bold">QR code</legend>
        <div className="text-xs text-muted">
          <Text form={form} name="qr.value" label="QR code says (empty: none)" aria="QR value" placeholder="https://shop.example/o/{order}" />
        </div>
        {v.qr.value ? (
          <div className="grid grid-cols-2 gap-2">
            <Num form={form} name="qr.module" label="Module" unit="mm" step={0.1} />
            <Pick form={form} name="qr.level" label="Error correction" options={[["L", "L (7 %)"], ["M", "M (15 %)"], ["Q", "Q (25 %)"], ["H", "H (30 %)"]]} />
            <Pick form={form} name="qr.relief" label="Relief" options={RELIEF} />
            <Num form={form} name="qr.depth" label={v.qr.relief === "emboss" ? "Height" : "Depth"} unit="mm" step={0.1} />
            <Pick form={form} name="qr.where" label="Place" options={WHERE} />
            <Num form={form} name="qr.maxSize" label="Max size" unit="mm" step={1} />
            {v.qr.where === "at" ? (
              <>
                <Num form={form} name="qr.x" label="x" unit="mm" step={0.5} />
                <Num form={form} name="qr.y" label="y" unit="mm" step={0.5} />
              </>
            ) : null}
          </div>
        ) : null}
      </fieldset>
      <LogoFields form={form} />
      <fieldset className="space-y-2">
        <legend className="font-bold">Piece marks</legend>
        <div className="grid grid-cols-2 items-end gap-2">
          <label className="flex items-center gap-2 pb-1.5 text-xs">
            <input type="checkbox" {...form.register("numbers")} /> numbers beside pieces
          </label>
          <Pick form={form} name="outlines" label="Outlines" aria="Piece outlines" options={[["ring", "outline rings"], ["pocket", "pockets"], ["none", "no outlines"]]} />
        </div>
        {v.numbers ? (
          <div className="grid grid-cols-3 gap-2">
            <Num form={form} name="numberStyle.size" label="Number height" unit="mm" step={0.5} />
            <Pick form={form} name="numberStyle.font" label="Number face" options={FACES} />
            <Num form={form} name="numberStyle.depth" label="Number depth" unit="mm" step={0.1} />
          </div>
        ) : null}
        {v.outlines !== "none" ? (
          <div className="grid grid-cols-3 gap-2">
            {v.outlines === "ring" ? <Num form={form} name="ringStyle.width" label="Ring width" unit="mm" step={0.1} /> : null}
            <Num form={form} name="ringStyle.clearance" label="Clearance" unit="mm" step={0.1} />
            <Num form={form} name="ringStyle.depth" label={v.outlines === "ring" ? "Ring depth" : "Pocket depth"} unit="mm" step={0.1} />
          </div>
        ) : null}
      </fieldset>
      <fieldset className="space-y-2">
        <legend className="font-bold">Values</legend>
        <p className="text-xs text-muted">What fills the {"{placeholders}"} in the preview and on the plate; {"{date}"} is today and {"{kit}"} the kit&apos;s name.</p>
        {valuePlaceholders(v).length === 0 ? <p className="text-xs text-muted">No placeholders in the text or the QR code.</p> : null}
        <div className="grid grid-cols-2 gap-2">
          {valuePlaceholders(v).map((n) => (
            <Text key={n} form={form} name={`samples.${n}` as Path<FormValues>} label={`{${n}}`} />
          ))}
        </div>
      </fieldset>
    </>
  );
}
