/**
 * Each text line against the room it has on the slab: its template's maxWidth, and what the bed
 * leaves it (the slab grows to hold a line, but never past the bed less its margins, and a band's logo
 * and QR code take their share). A line that is longer shrinks ("shrink", the default) to the
 * largest cap height that fits, never below the smallest whose strokes still print at the nozzle
 * (the plate checks' stroke measure), or is refused ("refuse") with by how much it is too long.
 */
import type { Finding } from "./checks";
import { printableStroke, strokeLoss, THIN_LOSS } from "./checks";
import { inBand, type MarkShapes, type TextLine } from "./mark-bands";
import { layoutText, lineWidth, type TextShape } from "./marks/text";
import type { PlateContext } from "./plate-context";

/** Cap heights are tried in steps of this (mm). */
export const FIT_STEP = 0.1;
/** The smallest cap height a text line may have (the options' own floor for `size`). */
export const MIN_CAP_HEIGHT = 1;

/** The longest a line may be (mm), what sets that, and the words for it in a finding. */
export type TextRoom = { width: number; by: "maxWidth" | "bed"; words: string };

const r1 = (n: number) => n.toFixed(1);
/** The cap height at step `k`, free of the float noise of k × 0.1. */
const stepSize = (k: number) => Math.round(k * FIT_STEP * 1e9) / 1e9;
/** A cap height in words: as asked where it is the line's own, else to the step it was found at. */
const mmOf = (n: number) => `${Number(n.toFixed(2))} mm`;

/**
 * The room a line has. A line in a band shares the band's width with the logo at its left and the QR
 * code at its right (and the spacing between them); a hand-placed line has the bed less its margins.
 * On a disc the bed's shorter side bounds the slab across.
 */
export function textRoom(ctx: PlateContext, shapes: MarkShapes, spacing: number, t: TextLine): TextRoom {
  const o = ctx.options;
  const { bed } = o.layout;
  const m = o.slab.margin;
  const disc = o.slab.shape === "disc";
  const across = (disc ? Math.min(bed.width, bed.depth) : bed.width) - 2 * m;
  const pos = t.mark.position;
  const where = pos === "top" ? "top" : "bottom";
  const banded = typeof pos !== "object";
  const logo = banded && shapes.logo && inBand(shapes.logo.mark.position, where) ? shapes.logo.w + spacing : 0;
  const qr = banded && shapes.qr && inBand(shapes.qr.mark.position, where) ? shapes.qr.shape.sizeWithQuietZone + spacing : 0;
  const beside = [logo ? "the logo" : "", qr ? "the QR code" : ""].filter(Boolean).join(" and ");
  const bedRoom = across - logo - qr;
  const bedWords =
    `the ${disc ? `${Math.min(bed.width, bed.depth)} mm disc the bed holds` : `${bed.width} mm wide bed`} leaves it ` +
    `${r1(bedRoom)} mm (less its ${m} mm margins${beside ? ` and ${beside} beside it` : ""})`;
  if (t.mark.maxWidth !== undefined && t.mark.maxWidth <= bedRoom)
    return { width: t.mark.maxWidth, by: "maxWidth", words: `its line allows ${t.mark.maxWidth} mm (its maximum width)` };
  return { width: bedRoom, by: "bed", words: bedWords };
}

/** What to change when a line has too little room, by what sets the room. */
function roomAdvice(room: TextRoom): string {
  return room.by === "maxWidth"
    ? "a larger maximum width for the line"
    : "a bigger bed or smaller margins (the slab grows to hold the line)";
}

/**
 * Fit every text line to its room. Returns the marks' shapes with shrunk lines laid out at their new
 * cap height (every other line as it was), a warning for each shrunk line and an error for each line
 * that cannot fit (field: its value, or its size where a smaller printable size would fit).
 */
export function fitTextLines(ctx: PlateContext, shapes: MarkShapes, spacing: number): { shapes: MarkShapes; findings: Finding[] } {
  const o = ctx.options;
  const { scope } = ctx;
  const { CrossSection } = ctx.kernel.wasm;
  const findings: Finding[] = [];
  const texts = shapes.texts.map((t): TextLine => {
    const room = textRoom(ctx, shapes, spacing, t);
    const width = lineWidth(t.shape);
    // No room at all is the band's logo and QR code against the bed: the layout's own finding says so.
    if (width <= room.width + 1e-9 || room.width <= 0) return t;
    const font = ctx.fonts[t.mark.font];
    const at = (size: number) => layoutText(font, t.value, size);
    const stroke = printableStroke(o.nozzle, t.mark.relief);
    const prints = (size: number) => strokeLoss(scope, scope.track(new CrossSection(at(size).contours, "NonZero")), stroke) <= THIN_LOSS;
    // The largest step that fits: width grows with the cap height (the outlines scale with it), so
    // start from the proportional size and step down while the laid-out line is still too long.
    let k = Math.floor((t.size * room.width) / width / FIT_STEP + 1e-9);
    let shape = at(stepSize(k));
    while (stepSize(k) > MIN_CAP_HEIGHT && lineWidth(shape) > room.width + 1e-9) shape = at(stepSize(--k));
    const fitting = stepSize(k) >= MIN_CAP_HEIGHT && lineWidth(shape) <= room.width + 1e-9 ? stepSize(k) : null;
    const fitsPrinting = fitting !== null && prints(fitting) ? fitting : null;
    const label = `Text line ${t.line + 1} ("${t.value}")`;
    const field = (name: "value" | "size") => ["marks", "text", t.line, name];
    const shrunk = (size: number, to: TextShape): TextLine => {
      findings.push({
        severity: "warning",
        code: "text_shrunk",
        field: field("size"),
        message:
          `${label} was reduced from ${mmOf(t.size)} to ${mmOf(size)} cap height to fit: at ${mmOf(t.size)} it is ` +
          `${r1(width)} mm long, and ${room.words}. Shorten it, or give it ${roomAdvice(room)}, to keep its size.`,
      });
      return { ...t, size, shape: to };
    };
    if (t.mark.fit === "shrink" && fitsPrinting !== null) return shrunk(fitsPrinting, shape);
    if (t.mark.fit === "refuse") {
      findings.push({
        severity: "error",
        code: "text_too_long",
        field: field(fitsPrinting !== null ? "size" : "value"),
        message:
          `${label} is ${r1(width - room.width)} mm too long: at ${mmOf(t.size)} it is ${r1(width)} mm long, and ${room.words}. ` +
          `Use shorter text, ${fitsPrinting !== null ? `a smaller size (it fits at ${mmOf(fitsPrinting)}), ` : ""}or ` +
          `${roomAdvice(room)}${fitsPrinting !== null ? `, or let it shrink to fit` : ""}.`,
      });
      return t;
    }
    // Shrinking cannot help: at the smallest cap height that prints it is still too long.
    const floor = smallestPrinting(t.size, prints);
    const floorShape = at(floor ?? t.size);
    const atFloor = lineWidth(floorShape);
    // Strokes that thin out as the text grows (rare) may print at the floor though not at the fitting step.
    if (floor !== null && atFloor <= room.width + 1e-9) return shrunk(floor, floorShape);
    const strokes = `${t.mark.relief === "engrave" ? "engraved strokes need 1" : "embossed strokes need 2"} × its line width`;
    findings.push({
      severity: "error",
      code: "text_too_long",
      field: field("value"),
      message:
        (floor !== null
          ? `${label} is ${r1(atFloor - room.width)} mm too long: even at ${mmOf(floor)}, the smallest cap height whose strokes ` +
            `print with the ${o.nozzle} mm nozzle (${strokes}), it is ${r1(atFloor)} mm long, and ${room.words}. `
          : `${label} is ${r1(atFloor - room.width)} mm too long at ${mmOf(t.size)} (${r1(atFloor)} mm long, and ${room.words}), ` +
            `and no smaller size helps: its strokes are already too thin for the ${o.nozzle} mm nozzle (${strokes}). `) +
        `Use shorter text, a finer nozzle, or ${roomAdvice(room)}.`,
    });
    return t;
  });
  return { shapes: { ...shapes, texts }, findings };
}

/**
 * The smallest step of cap height, from the options' floor up to `size`, at which a line's strokes
 * print, found by halving (`prints` holds from there up: strokes widen with the cap height); `size`
 * when no step below it prints, null when not even `size` does.
 */
function smallestPrinting(size: number, prints: (size: number) => boolean): number | null {
  if (!prints(size)) return null;
  let lo = Math.round(MIN_CAP_HEIGHT / FIT_STEP),
    hi = Math.floor(size / FIT_STEP + 1e-9);
  if (hi < lo || !prints(stepSize(hi))) return size;
  while (lo < hi) {
    const mid = Math.floor((lo + hi) / 2);
    if (prints(stepSize(mid))) hi = mid;
    else lo = mid + 1;
  }
  return stepSize(lo);
}
