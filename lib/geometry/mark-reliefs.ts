import type { CrossSection } from "manifold-3d";
import type { MarkDepths } from "./build-checks";
import type { CheckInput } from "./checks";
import type { Logo, MarkPlaces, NumberGlyphs } from "./mark-bands";
import { QUIET_ZONE_MODULES } from "./marks/qr";
import type { Contour } from "./marks/text";
import type { Piece } from "./pieces";
import type { PlateContext } from "./plate-context";

/** Segments per circle of the round offsets that draw rings and pockets. */
const RING_SEGMENTS = 48;
/**
 * Rings and pockets are simplified to this (mm) before they are cut: round offsets add many vertices,
 * which slow the slab's booleans several times over (measured on the benchmark plate).
 */
const RING_SIMPLIFY = 0.005;

/** The marks as regions on the slab top, grouped by relief and depth (mm), each list in the order made. */
export type Reliefs = {
  engrave: Map<number, CrossSection[]>;
  emboss: Map<number, CrossSection[]>;
  /** Text, logo and number regions, for the plate checks (against the pieces, stroke widths). */
  regions: CheckInput["marks"];
};

/**
 * Every mark as a kernel cross-section where it goes: text lines, the QR code (inside its quiet zone),
 * the logo, and each piece's number and ring or pocket. `shadows` are the pieces' placed shadows, in
 * the pieces' order.
 */
export function markReliefs(
  ctx: PlateContext,
  m: {
    places: MarkPlaces;
    logo: Logo | null;
    depths: MarkDepths;
    pieces: Piece[];
    shadows: CrossSection[];
    glyphs: Map<number, NumberGlyphs>;
    numberOf: Map<number, number>;
  },
): Reliefs {
  const { scope, options: o } = ctx;
  const { CrossSection } = ctx.kernel.wasm;
  const { places, depths } = m;
  const engrave = new Map<number, CrossSection[]>();
  const emboss = new Map<number, CrossSection[]>();
  const regions: Reliefs["regions"] = [];
  const add = (relief: "engrave" | "emboss", depth: number, cs: CrossSection) => {
    const map = relief === "engrave" ? engrave : emboss;
    const list = map.get(depth) ?? [];
    list.push(cs);
    map.set(depth, list);
  };
  const glyphCs = (contours: Contour[], x: number, y: number) =>
    scope.track(scope.track(new CrossSection(contours, "NonZero")).translate(x, y));

  places.texts.forEach((b, i) => {
    const depth = depths.texts[i];
    if (depth === undefined) return;
    const cs = glyphCs(b.shape.contours, b.x, b.y);
    add(b.mark.relief, depth, cs);
    regions.push({
      kind: "text",
      label: `"${b.value}"`,
      cs,
      relief: b.mark.relief,
      field: ["marks", "text", b.line, "size"],
    });
  });
  const qr = places.qr;
  if (qr && depths.qr !== undefined) {
    const inset = QUIET_ZONE_MODULES * qr.mark.module;
    add(qr.mark.relief, depths.qr, glyphCs(qr.shape.contours, qr.x + inset, qr.y + inset));
  }
  const { logo } = m;
  if (logo && places.logo && depths.logo !== undefined) {
    const parts = logo.parts
      .filter((p) => p.contours.length)
      .map((p) => scope.track(new CrossSection(p.contours, p.fillRule === "evenodd" ? "EvenOdd" : "NonZero")));
    const cs = scope.track(scope.track(CrossSection.union(parts)).translate(places.logo.x, places.logo.y));
    add(logo.mark.relief, depths.logo, cs);
    regions.push({ kind: "logo", label: logo.mark.name, cs, relief: logo.mark.relief, field: ["marks", "logo", "width"] });
  }
  const ring = o.marks.ringStyle;
  m.pieces.forEach((p, i) => {
    const shadow = m.shadows[i]!;
    const glyphs = m.glyphs.get(p.slot);
    if (glyphs) {
      const cs = glyphCs(glyphs.shape.contours, glyphs.x, glyphs.y);
      add("engrave", depths.number, cs);
      regions.push({
        kind: "number",
        label: `number ${m.numberOf.get(p.slot)!}`,
        cs,
        relief: "engrave",
        field: ["marks", "numberStyle", "size"],
      });
    }
    if (o.marks.outlines === "ring") {
      const outer = scope.track(shadow.offset(ring.clearance + ring.width, "Round", 2, RING_SEGMENTS));
      const inner = scope.track(shadow.offset(ring.clearance, "Round", 2, RING_SEGMENTS));
      add("engrave", depths.ring, scope.track(scope.track(outer.subtract(inner)).simplify(RING_SIMPLIFY)));
    } else if (o.marks.outlines === "pocket") {
      add(
        "engrave",
        depths.ring,
        scope.track(scope.track(shadow.offset(ring.clearance, "Round", 2, RING_SEGMENTS)).simplify(RING_SIMPLIFY)),
      );
    }
  });
  return { engrave, emboss, regions };
}

/** Every engraved or embossed region (rings, pockets and the QR code too). */
export function allReliefs(r: Reliefs): CrossSection[] {
  return [...r.engrave.values(), ...r.emboss.values()].flat();
}

/** The marks' outlines seen from above (text, QR, logo, numbers, rings), for top views and sheets. */
export function reliefOutlines(ctx: PlateContext, r: Reliefs): Contour[] {
  const all = allReliefs(r);
  return all.length ? ctx.scope.track(ctx.kernel.wasm.CrossSection.union(all)).toPolygons() : [];
}
