import type { Finding } from "./checks";
import type { ImportWarning } from "./import";
import { UNIT_MM, type Unit } from "./io/raw";

/** The `units` a plate request may name for a part, and the importer's unit each stands for. */
export const API_UNITS = { mm: "millimeter", cm: "centimeter", m: "meter", in: "inch" } as const satisfies Record<string, Unit>;
export type ApiUnit = keyof typeof API_UNITS;
const API_NAME: Partial<Record<Unit, ApiUnit>> = Object.fromEntries(Object.entries(API_UNITS).map(([k, v]) => [v, k]));
const PLURAL: Record<Unit, string> = {
  micron: "microns",
  millimeter: "millimetres",
  centimeter: "centimetres",
  inch: "inches",
  foot: "feet",
  meter: "metres",
};

/** A unit named in words, en-GB and plural ("centimetres"), as the UI says it. */
export function unitWords(unit: Unit): string {
  return PLURAL[unit];
}

/** A part as the build read it: which one, in which unit, with what the importer noticed and its size as it will stand. */
export type ReadPart = {
  /** 1-based place in the request (or kit). */
  index: number;
  name: string;
  unit: Unit;
  /** "upload": sent with the request (fixed with `units`); "library": a stored part (fixed by reading it again in the parts library). */
  source: "upload" | "library";
  warnings: ImportWarning[];
  /** Extent (mm) along x, y, z as oriented for the plate. */
  size: [number, number, number];
};

/**
 * Parts whose size says they were read in the wrong unit: the importer's `units_suspect` warning,
 * named; and an error for a part under 1 mm in its largest size (nothing printable, common practice:
 * a 0.4 mm nozzle cannot draw it) or one that cannot lie on the bed either way round. Each names the fix.
 */
export function unitFindings(part: ReadPart, bed: { width: number; depth: number }): Finding[] {
  const out: Finding[] = [];
  const who = `Part ${part.index} (${part.name})`;
  for (const w of part.warnings) out.push({ severity: "warning", code: w.code, message: `${who}: ${w.message}` });
  const largest = Math.max(...part.size);
  const [w, d] = part.size;
  const offBed = (w > bed.width + 1e-6 || d > bed.depth + 1e-6) && (w > bed.depth + 1e-6 || d > bed.width + 1e-6);
  if (largest >= 1 && !offBed) return out;
  // The unit that brings it to a plausible size: the importer's suggestion when it made one, else
  // (too large for the bed, under a metre) millimetres when it was read in a larger unit.
  const suggested =
    part.warnings.find((x) => x.code === "units_suspect")?.suggestion.unit ??
    (largest >= 1 && UNIT_MM[part.unit] > 1 ? "millimeter" : undefined);
  const as = suggested ? ` (${(largest * (UNIT_MM[suggested] / UNIT_MM[part.unit])).toFixed(1)} mm)` : "";
  const question = suggested ? ` Is it in ${PLURAL[suggested]}?` : "";
  const fix = !suggested
    ? " Scale it in your modelling program."
    : part.source === "upload"
      ? API_NAME[suggested]
        ? ` Send units: "${API_NAME[suggested]}" for it${as}.`
        : ` Scale it in your modelling program${as}.`
      : ` Read it again in ${PLURAL[suggested]} in the parts library${as}.`;
  if (largest < 1) {
    out.push({
      severity: "error",
      code: "part_too_small",
      message: `${who} is ${largest.toPrecision(2)} mm across, read as ${PLURAL[part.unit]}: too small to print.${question}${fix}`,
    });
  } else {
    out.push({
      severity: "error",
      code: "part_larger_than_bed",
      message:
        `${who} is ${w.toFixed(1)} × ${d.toFixed(1)} mm, read as ${PLURAL[part.unit]}: larger than the ${bed.width} × ` +
        `${bed.depth} mm bed.${question}${fix}`,
    });
  }
  return out;
}
