"use client";

import { get, type FieldErrors, type Resolver } from "react-hook-form";
import type { Form } from "./fields";
import { LayoutFields } from "./fieldsets/layout";
import { LogoFieldset } from "./fieldsets/logo";
import { PieceMarksFieldset } from "./fieldsets/piece-marks";
import { PrintFieldset } from "./fieldsets/print";
import { QrFieldset } from "./fieldsets/qr";
import { SlabFieldset } from "./fieldsets/slab";
import { TextLinesFieldset } from "./fieldsets/text-lines";
import { ValuesFieldset } from "./fieldsets/values";
import { formProblems, type FormValues } from "./form-model";

/**
 * The slab editor's options form: react-hook-form over the form model (form-model.ts), checked by
 * the engine's own zod schema, whose messages are shown at their fields; one fieldset per section.
 */

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

/**
 * `missing`: placeholders with no value at all; `fallbacks`: what an empty Values field falls back
 * to (a template's samples or defaults).
 */
export function OptionsFields({
  form,
  missing = [],
  fallbacks = {},
}: {
  form: Form;
  missing?: string[];
  fallbacks?: Record<string, string>;
}) {
  return (
    <>
      <SlabFieldset form={form}>
        <LayoutFields form={form} />
      </SlabFieldset>
      <PrintFieldset form={form} />
      <TextLinesFieldset form={form} />
      <QrFieldset form={form} />
      <LogoFieldset form={form} />
      <PieceMarksFieldset form={form} />
      <ValuesFieldset form={form} missing={missing} fallbacks={fallbacks} />
    </>
  );
}
