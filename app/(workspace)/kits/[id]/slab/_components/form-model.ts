import type { Finding } from "@/lib/geometry/checks";
import type { EngravingFontId } from "@/lib/geometry/fonts";
import {
  DEFAULT_OPTIONS,
  deepestEngraving,
  slabOptionsSchema,
  type Depth,
  type LogoMark,
  type MarkPosition,
  type Material,
  type Placement,
  type QrMark,
  type SlabOptions,
  type SlabOptionsInput,
  type TextFit,
  type TextMark,
} from "@/lib/geometry/options";
import type { SlabShape } from "@/lib/geometry/slab";
import { BUILT_IN_VARIABLES, usedPlaceholders } from "@/lib/geometry/template";

/**
 * The slab editor's form model, without React: values shaped for people (a bed picked by size, a
 * position picked from a list, every depth a number) and the two ways between them and the slab
 * builder's canonical options. The engine's own zod schema checks the result; its messages are mapped
 * back to the fields here.
 *
 * Number fields hold NaN when left empty (that is what an emptied `<input type="number">` reads as);
 * an optional option is then left out, a required one is refused by the schema ("Enter a number.").
 */

/** Bed presets, width × depth in mm; any other size is "custom". */
export const BEDS = [
  [180, 180],
  [220, 220],
  [235, 235],
  [250, 210],
  [256, 256],
  [300, 300],
  [350, 350],
  [400, 400],
] as const;

/** Where a mark goes: the engine's named positions, or "at" with the x / y fields. */
export type Where = Extract<MarkPosition, string> | "at";
export type Relief = TextMark["relief"];

/** `maxWidth` and `maxSize` are NaN when not set (an empty number field). */
export type LineForm = {
  value: string;
  size: number;
  font: EngravingFontId;
  relief: Relief;
  depth: number;
  where: Where;
  x: number;
  y: number;
  maxWidth: number;
  /** What the engine does with a line too long for its room: shrink it, or refuse the plate. */
  fit: TextFit;
};
export type QrForm = {
  value: string;
  module: number;
  level: QrMark["level"];
  relief: Relief;
  depth: number;
  where: Where;
  x: number;
  y: number;
  maxSize: number;
};
export type LogoForm = {
  name: string;
  paths: LogoMark["paths"];
  box: LogoMark["box"];
  width: number;
  relief: Relief;
  depth: number;
  where: Where;
  x: number;
  y: number;
};
export type FormValues = {
  slab: { shape: SlabShape; thickness: number; gap: number; cornerRadius: number; margin: number };
  /** A preset's key ("220x220", see `bedKey`) or "custom" (then `bedWidth` × `bedDepth`). */
  bed: string;
  bedWidth: number;
  bedDepth: number;
  spacing: number;
  copies: number;
  material: Material;
  nozzle: number;
  layerHeight: number;
  firstLayerHeight: number;
  pricePerKg: number;
  text: LineForm[];
  qr: QrForm;
  logo: LogoForm | null;
  numbers: boolean;
  numberStyle: { size: number; font: EngravingFontId; depth: number };
  outlines: SlabOptions["marks"]["outlines"];
  ringStyle: { width: number; clearance: number; depth: number };
  /** Values for the {placeholders}, shown in the preview and used for the plate. */
  samples: Record<string, string>;
};

const D = DEFAULT_OPTIONS;

/** A new text line as "Add a text line" makes it. */
export const newLine = (value: string, size: number): LineForm => ({
  value,
  size,
  font: "sans-bold",
  relief: "engrave",
  depth: 0.4,
  where: "auto",
  x: 0,
  y: 0,
  maxWidth: NaN,
  fit: "shrink",
});

export const DEFAULT_VALUES: FormValues = {
  slab: { ...D.slab },
  bed: "220x220",
  bedWidth: 220,
  bedDepth: 220,
  spacing: D.layout.spacing,
  copies: 1,
  material: D.material,
  nozzle: D.nozzle,
  layerHeight: D.layerHeight,
  firstLayerHeight: D.firstLayerHeight,
  pricePerKg: D.pricePerKg,
  text: [newLine("ORDER {order}", 5), newLine("Thank you, {customer}!", 4)],
  qr: { value: "", module: 1.2, level: "M", relief: "engrave", depth: 0.4, where: "auto", x: 0, y: 0, maxSize: NaN },
  logo: null,
  numbers: true,
  numberStyle: { size: D.marks.numberStyle.size, font: D.marks.numberStyle.font, depth: 0.4 },
  outlines: "ring",
  ringStyle: { width: D.marks.ringStyle.width, clearance: D.marks.ringStyle.clearance, depth: 0.4 },
  samples: { order: "10482", customer: "Sam" },
};

export const bedKey = (width: number, depth: number) => `${width}x${depth}`;

/** The bed's size in mm: a preset's from its key, a custom bed's from its two fields. */
export function bedSize(f: Pick<FormValues, "bed" | "bedWidth" | "bedDepth">): { width: number; depth: number } {
  if (f.bed === "custom") return { width: f.bedWidth, depth: f.bedDepth };
  const [width, depth] = f.bed.split("x").map(Number);
  return { width: width ?? NaN, depth: depth ?? NaN };
}

/** The form's bed for a size: its preset when there is one, else "custom". */
export function bedChoice(size: { width: number; depth: number }): string {
  const preset = BEDS.find(([w, d]) => w === size.width && d === size.depth);
  return preset ? bedKey(preset[0], preset[1]) : "custom";
}

export const toPosition = (where: Where, x: number, y: number): MarkPosition => (where === "at" ? { x, y } : where);
export const fromPosition = (p: MarkPosition): { where: Where; x: number; y: number } =>
  typeof p === "object" ? { where: "at", x: p.x, y: p.y } : { where: p, x: 0, y: 0 };

/** An optional number option: present when the field holds a number, left out when it is empty (NaN). */
const optional = <K extends string>(k: K, v: number) => (Number.isFinite(v) ? ({ [k]: v } as Record<K, number>) : {});

/** A text line or QR value counts once it holds more than blanks. */
const filled = (value: string) => value.trim() !== "";

/** Placeholders used in the text and QR values that the person fills ({date} and {kit} fill themselves). */
export function valuePlaceholders(f: Pick<FormValues, "text" | "qr">): string[] {
  return usedPlaceholders({
    marks: {
      text: f.text.filter((t) => filled(t.value)).map((t) => ({ value: t.value })),
      ...(filled(f.qr.value) ? { qr: { value: f.qr.value } } : {}),
    },
  }).filter((n) => !(BUILT_IN_VARIABLES as readonly string[]).includes(n));
}

export function formToOptions(f: FormValues, placements?: Placement[]): SlabOptionsInput {
  return {
    slab: { ...f.slab },
    layout: { spacing: f.spacing, bed: bedSize(f), copies: f.copies, ...(placements ? { placements } : {}) },
    marks: {
      // An emptied line is left out rather than refused, so a line can be retyped without an error.
      text: f.text
        .filter((t) => filled(t.value))
        .map((t) => ({
          value: t.value,
          size: t.size,
          font: t.font,
          relief: t.relief,
          depth: t.depth,
          position: toPosition(t.where, t.x, t.y),
          ...optional("maxWidth", t.maxWidth),
          fit: t.fit,
        })),
      ...(filled(f.qr.value)
        ? {
            qr: {
              value: f.qr.value,
              module: f.qr.module,
              level: f.qr.level,
              relief: f.qr.relief,
              depth: f.qr.depth,
              position: toPosition(f.qr.where, f.qr.x, f.qr.y),
              ...optional("maxSize", f.qr.maxSize),
            },
          }
        : {}),
      ...(f.logo
        ? {
            logo: {
              name: f.logo.name,
              paths: f.logo.paths,
              box: f.logo.box,
              width: f.logo.width,
              relief: f.logo.relief,
              depth: f.logo.depth,
              position: toPosition(f.logo.where, f.logo.x, f.logo.y),
            },
          }
        : {}),
      numbers: f.numbers,
      numberStyle: { ...f.numberStyle },
      outlines: f.outlines,
      ringStyle: { ...f.ringStyle },
    },
    material: f.material,
    nozzle: f.nozzle,
    layerHeight: f.layerHeight,
    firstLayerHeight: f.firstLayerHeight,
    pricePerKg: f.pricePerKg,
  };
}

/**
 * A depth as the form holds it. "As deep as allowed" shows as that depth (to 0.01 mm); a depth left
 * out shows as the engine's 0.4 mm, or the deepest allowed when the slab is thinner.
 */
export function formDepth(d: Depth | undefined, o: Pick<SlabOptions, "layerHeight" | "slab">): number {
  const deepest = Math.round(deepestEngraving(o) * 100) / 100;
  return d === "max" ? deepest : (d ?? Math.min(0.4, deepest));
}

/**
 * The other way: canonical options (a template's, say) as form values. Hand placements and piece
 * numbers are not form fields: they belong to a kit and its plates, so they are not carried over.
 */
export function optionsToForm(input: SlabOptionsInput, samples: FormValues["samples"] = {}): FormValues {
  const o = slabOptionsSchema.parse(input);
  const depth = (d: Depth | undefined) => formDepth(d, o);
  const { qr, logo } = o.marks;
  return {
    slab: { ...o.slab },
    bed: bedChoice(o.layout.bed),
    bedWidth: o.layout.bed.width,
    bedDepth: o.layout.bed.depth,
    spacing: o.layout.spacing,
    copies: o.layout.copies,
    material: o.material,
    nozzle: o.nozzle,
    layerHeight: o.layerHeight,
    firstLayerHeight: o.firstLayerHeight,
    pricePerKg: o.pricePerKg,
    text: o.marks.text.map((t) => ({
      value: t.value,
      size: t.size,
      font: t.font,
      relief: t.relief,
      depth: depth(t.depth),
      ...fromPosition(t.position),
      maxWidth: t.maxWidth ?? NaN,
      fit: t.fit,
    })),
    qr: qr
      ? {
          value: qr.value,
          module: qr.module,
          level: qr.level,
          relief: qr.relief,
          depth: depth(qr.depth),
          ...fromPosition(qr.position),
          maxSize: qr.maxSize ?? NaN,
        }
      : DEFAULT_VALUES.qr,
    logo: logo
      ? {
          name: logo.name,
          paths: logo.paths,
          box: logo.box,
          width: logo.width,
          relief: logo.relief,
          depth: depth(logo.depth),
          ...fromPosition(logo.position),
        }
      : null,
    numbers: o.marks.numbers,
    numberStyle: { ...o.marks.numberStyle, depth: depth(o.marks.numberStyle.depth) },
    outlines: o.marks.outlines,
    ringStyle: { ...o.marks.ringStyle, depth: depth(o.marks.ringStyle.depth) },
    samples,
  };
}

/** Where an option's message belongs in the form (text lines by their index among the sent lines). */
export function formPath(optionPath: readonly PropertyKey[]): string {
  const p = optionPath.map(String);
  if (p[0] === "layout" && p[1] === "bed") return p[2] === undefined ? "bed" : p[2] === "depth" ? "bedDepth" : "bedWidth";
  if (p[0] === "layout") return p[1]!;
  if (p[0] === "marks" && p[1] === "text") {
    const f = p[3] === "position" ? (p[4] ?? "x") : p[3];
    return `text.${p[2]}.${f}`;
  }
  if (p[0] === "marks" && p[1] === "qr") return p[2] === "position" ? `qr.${p[3] ?? "x"}` : `qr.${p[2]}`;
  if (p[0] === "marks" && p[1] === "logo") return p[2] === "position" ? `logo.${p[3] ?? "x"}` : `logo.${p[2] ?? "width"}`;
  if (p[0] === "marks") return p.slice(1).join(".");
  return p.join(".");
}

/**
 * `formPath` with the text line's index turned from its place among the sent lines (emptied lines
 * are not sent) to its place in the form.
 */
export function fieldPath(optionPath: readonly PropertyKey[], values: Pick<FormValues, "text">): string {
  const path = formPath(optionPath);
  const m = /^text\.(\d+)\.(.*)$/.exec(path);
  if (!m) return path;
  const kept = values.text.map((t, i) => (filled(t.value) ? i : -1)).filter((i) => i >= 0);
  return `text.${kept[Number(m[1])] ?? m[1]}.${m[2]}`;
}

/** The engine's findings that name an option, by the form field they belong to (shown under it). */
export type FieldNotes = Map<string, Pick<Finding, "severity" | "message" | "code">[]>;

export function fieldNotes(findings: Finding[], values: Pick<FormValues, "text">): FieldNotes {
  const out: FieldNotes = new Map();
  for (const f of findings) {
    if (!f.field || f.severity === "info") continue;
    const path = fieldPath(f.field, values);
    out.set(path, [...(out.get(path) ?? []), { severity: f.severity, message: f.message, code: f.code }]);
  }
  return out;
}

/**
 * zod's words for a number field left empty (NaN), said the way the form says it. Only a wrong type
 * is: zod's range messages also say "expected number" ("Too big: expected number to be <=0.5").
 */
export const friendlyMessage = (issue: { code: string; message: string }) =>
  issue.code === "invalid_type" && /expected number/i.test(issue.message) ? "Enter a number." : issue.message;

/** One message per form field, the first the schema gives for it, in field order. */
export type FormProblems = { path: string; type: string; message: string }[];

/** The engine's schema run on the form: what it refuses, by form field. Empty when the options pass. */
export function formProblems(values: FormValues): FormProblems {
  const r = slabOptionsSchema.safeParse(formToOptions(values));
  if (r.success) return [];
  const seen = new Set<string>();
  const out: FormProblems = [];
  for (const issue of r.error.issues) {
    const path = fieldPath(issue.path, values);
    if (seen.has(path)) continue;
    seen.add(path);
    out.push({ path, type: issue.code, message: friendlyMessage(issue) });
  }
  return out;
}
