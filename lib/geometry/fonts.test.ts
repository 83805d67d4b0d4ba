import { readFileSync } from "node:fs";
import path from "node:path";
import opentype from "opentype.js";
import { describe, expect, it } from "vitest";
import { ENGRAVING_FONTS } from "./fonts";

const load = (file: string) => {
  const buf = readFileSync(path.join(process.cwd(), "fonts", file));
  return opentype.parse(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength));
};

describe("engraving faces shipped in fonts/", () => {
  it("every listed face parses with opentype.js and draws a multi-character string", () => {
    for (const { file } of Object.values(ENGRAVING_FONTS)) {
      const font = load(file);
      expect(font.unitsPerEm).toBeGreaterThan(0);
      const path = font.getPath("Order 10482", 0, 0, 5);
      const box = path.getBoundingBox();
      expect(box.x2 - box.x1).toBeGreaterThan(10);
      expect(path.commands.length).toBeGreaterThan(50);
    }
  });

  it("the sans face is bold and the mono face is monospaced", () => {
    // OpenType OS/2 table: usWeightClass 700 = Bold (OpenType specification, OS/2 table).
    const sans = load(ENGRAVING_FONTS["sans-bold"].file);
    expect(sans.tables.os2?.usWeightClass).toBe(700);
    const mono = load(ENGRAVING_FONTS["mono-bold"].file);
    const widths = new Set([..."0123456789ABCDEFWMil.-"].map((c) => mono.charToGlyph(c).advanceWidth));
    expect(widths.size).toBe(1);
  });
});
