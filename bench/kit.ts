/**
 * The benchmark kit, fixed by code (no mesh files to commit): 24 distinct turned pieces of about 25k
 * triangles each, ~600k in all, with three text lines, a QR code, numbers and rings.
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import { pawn } from "../lib/geometry/demo-shapes";
import { parseFontBook } from "../lib/geometry/fonts";
import { orientMesh } from "../lib/geometry/orient";
import type { PlatePart } from "../lib/geometry/build-plate";
import type { SlabOptionsInput } from "../lib/geometry/options";

export function benchParts(count = 24, segments = 830): PlatePart[] {
  return Array.from({ length: count }, (_, i) => {
    const m = pawn(segments + (i % 7) * 4);
    const s = 1 + (i % 5) * 0.08;
    const p = m.vertProperties;
    for (let k = 0; k < p.length; k++) p[k] = p[k]! * s;
    return { id: `p${i + 1}`, name: `Piece ${i + 1}`, mesh: orientMesh(m), quantity: 1 };
  });
}

export const BENCH_OPTIONS: SlabOptionsInput = {
  layout: { bed: { width: 250, depth: 210 } },
  marks: {
    text: [{ value: "ORDER 10482" }, { value: "Thank you, Sam!", size: 4 }, { value: "Marrowby Tabletop Co.", size: 4 }],
    qr: { value: "https://example.com/o/10482" },
    numbers: true,
    outlines: "ring",
  },
};

export function benchFonts() {
  const f = (n: string) => readFileSync(path.join(import.meta.dirname, "..", "fonts", n));
  return parseFontBook({ "sans-bold": f("DejaVuSans-Bold.ttf"), "mono-bold": f("DejaVuSansMono-Bold.ttf") });
}
