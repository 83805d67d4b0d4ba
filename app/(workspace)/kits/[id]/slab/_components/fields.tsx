"use client";

import { createContext, useContext, useId } from "react";
import { get, type Path, type UseFormReturn } from "react-hook-form";
import { ENGRAVING_FONTS } from "@/lib/geometry/fonts";
import type { FieldNotes, FormValues, Relief, Where } from "./form-model";

/** The options form's field controls: a label, the control, then its error or the engine's notes. */

export type Form = UseFormReturn<FormValues>;

/** The engine's findings that name an option, by form field (see `fieldNotes`). */
export const FieldNotesContext = createContext<FieldNotes>(new Map());

export const WHERE: [Where, string][] = [
  ["auto", "auto"],
  ["top", "above"],
  ["bottom", "below"],
  ["at", "at x / y"],
];
export const RELIEF: [Relief, string][] = [
  ["engrave", "engraved"],
  ["emboss", "embossed"],
];
export const FACES = Object.entries(ENGRAVING_FONTS).map(([id, f]) => [id, f.label] as [string, string]);

const input = "field-input mt-0.5 py-1 text-sm";

const errorAt = (form: Form, name: Path<FormValues>) => (get(form.formState.errors, name) as { message?: string } | undefined)?.message;

/** The ids of a field's notes, for its control's aria-describedby: a screen reader says them at the field. */
function useNoteIds(name: string, id: string): string | undefined {
  const notes = useContext(FieldNotesContext).get(name);
  return notes?.length ? notes.map((n) => `${id}-n-${n.code}`).join(" ") : undefined;
}

function Notes({ name, id }: { name: string; id: string }) {
  const notes = useContext(FieldNotesContext).get(name);
  if (!notes?.length) return null;
  return (
    <>
      {notes.map((n) => (
        <span
          key={n.code}
          id={`${id}-n-${n.code}`}
          data-testid={`field-note-${n.code}`}
          className={`mt-0.5 block whitespace-normal ${n.severity === "error" ? "text-finding-error" : "text-finding-warning"}`}
        >
          {n.severity === "error" ? "✕ " : "⚠ "}
          {n.message}
        </span>
      ))}
    </>
  );
}

export function Num({
  form,
  name,
  label,
  unit,
  step,
  testId,
  className = "",
}: {
  form: Form;
  name: Path<FormValues>;
  label: string;
  unit?: string;
  step: number;
  testId?: string;
  className?: string;
}) {
  const id = `${useId()}-${name}`;
  const error = errorAt(form, name);
  const noteIds = useNoteIds(name, id);
  return (
    <div className={`text-xs text-muted ${className}`}>
      <label htmlFor={id}>
        {label}
        {unit ? <span className="ml-1">({unit})</span> : null}
      </label>
      <input
        id={id}
        type="number"
        inputMode="decimal"
        step={step}
        className={input}
        aria-invalid={Boolean(error)}
        aria-describedby={error ? `${id}-e` : noteIds}
        data-testid={testId}
        {...form.register(name, { valueAsNumber: true })}
      />
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

export function Pick({
  form,
  name,
  label,
  options,
  aria,
}: {
  form: Form;
  name: Path<FormValues>;
  label: string;
  options: [string, string][];
  aria?: string;
}) {
  const id = `${useId()}-${name}`;
  const noteIds = useNoteIds(name, id);
  return (
    <div className="text-xs text-muted">
      <label htmlFor={id}>{label}</label>
      <select id={id} className={input} aria-label={aria} aria-describedby={noteIds} {...form.register(name)}>
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

export function Text({
  form,
  name,
  label,
  placeholder,
  aria,
}: {
  form: Form;
  name: Path<FormValues>;
  label: string;
  placeholder?: string;
  aria?: string;
}) {
  const id = `${useId()}-${name}`;
  const error = errorAt(form, name);
  const noteIds = useNoteIds(name, id);
  return (
    <div className="text-xs text-muted">
      <label htmlFor={id}>{label}</label>
      <input
        id={id}
        className={input}
        placeholder={placeholder}
        aria-label={aria}
        aria-invalid={Boolean(error)}
        aria-describedby={error ? `${id}-e` : noteIds}
        {...form.register(name)}
      />
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
