import * as fontkit from "fontkit";
import { beforeAll, describe, expect, it } from "vitest";
import { fontBytes, loadFonts } from "@/tests/support/engine";
import type { FontBook } from "../fonts";
import { loadKernel, type Kernel } from "../kernel";
import { advanceUnits, capHeightUnits, layoutText } from "./text";

let fonts: FontBook;
let kernel: Kernel;
beforeAll(async () => {
  fonts = loadFonts();
  kernel = await loadKernel();
});

const samples = ["ORDER 10482", "Thank you, Sam!", "AVATAR Wo Ty", "To VAT", "88 B&o 4e"];

describe("text layout", () => {
  it.each(["sans-bold", "mono-bold"] as const)("advance widths and kerning in %s match fontkit, an independent font library", (id) => {
    const fk = fontkit.create(fontBytes(id));
    for (const s of samples) {
      const theirs = fk.layout(s).positions.reduce((a, p) => a + p.xAdvance, 0);
      expect(advanceUnits(fonts[id], s)).toBe(theirs);
      // And the millimetre layout follows: advance = units × em / unitsPerEm.
      const shape = layoutText(fonts[id], s, 5);
      expect(shape.advance).toBeCloseTo((theirs * shape.emSize) / fk.unitsPerEm, 9);
    }
  });

  it("kerns: AV is narrower than A plus V in the sans face", () => {
    const f = fonts["sans-bold"];
    expect(advanceUnits(f, "AV")).toBeLessThan(advanceUnits(f, "A") + advanceUnits(f, "V"));
  });

  it("gives the asked cap height", () => {
    const shape = layoutText(fonts["sans-bold"], "H", 5);
    expect(shape.bounds.maxY - shape.bounds.minY).toBeCloseTo(5, 2);
    expect(capHeightUnits(fonts["sans-bold"])).toBeGreaterThan(0);
  });

  it("fills letters with their holes (o, e, B, 8, 4) and keeps flattening error small", () => {
    const { CrossSection } = kernel.wasm;
    const fine = layoutText(fonts["sans-bold"], "oeB84", 5, 0.001);
    const normal = layoutText(fonts["sans-bold"], "oeB84", 5);
    const a = new CrossSection(fine.contours, "NonZero");
    const b = new CrossSection(normal.contours, "NonZero");
    const solid = new CrossSection(
      fine.contours.map((c) => [...c]),
      "EvenOdd",
    );
    try {
      // Holes are cut out: NonZero and EvenOdd agree when every hole runs against its outline.
      expect(a.area()).toBeCloseTo(solid.area(), 6);
      // The hull of "o" is far bigger than its ink: the counter is open.
      const hull = a.hull();
      expect(a.area()).toBeLessThan(0.8 * hull.area());
      hull.delete();
      // Chord flattening only ever cuts inside convex arcs: the coarse area is a little smaller, within 1 %.
      const rel = (a.area() - b.area()) / a.area();
      expect(Math.abs(rel)).toBeLessThan(0.01);
    } finally {
      a.delete();
      b.delete();
      solid.delete();
    }
  });
});
