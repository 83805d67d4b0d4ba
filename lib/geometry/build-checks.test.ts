import { describe, expect, it } from "vitest";
import { loadFonts } from "@/tests/support/engine";
import type { TextLine } from "./mark-bands";
import { layoutText, lineWidth } from "./marks/text";
import { parseOptions } from "./options";

const fonts = loadFonts();
const font = fonts["mono-bold"];
const VALUE = "HILL";

/** The line laid out as a build lays it out, its template allowing `maxWidth` mm. */
function line(maxWidth?: number): TextLine {
  const mark = parseOptions({ marks: { text: [{ value: VALUE, size: 5, font: "mono-bold", ...(maxWidth ? { maxWidth } : {}) }] } }).marks
    .text[0]!;
  return { mark, line: 0, value: mark.value, size: mark.size, shape: layoutText(font, mark.value, mark.size) };
}

describe("a text line's length: one measure for the template's room and the bed's", () => {
  it("is the font's own layout: advances from the pen origin, then the last glyph's ink (OpenType hmtx, glyf)", () => {
    // From the font's tables as opentype.js reads them: DejaVu Sans Mono is monospaced (post.isFixedPitch),
    // so the pen moves one advance width per glyph with no kerning; the last glyph's ink ends at its glyf xMax.
    // The cap height the text is sized by is the H's height (glyf yMax), the font's OS/2 table giving none.
    const glyphs = font.stringToGlyphs(VALUE);
    const scale = 5 / font.charToGlyph("H").yMax!;
    const pen = glyphs.slice(0, -1).reduce((s, g) => s + g.advanceWidth!, 0);
    expect(lineWidth(line().shape)).toBeCloseTo((pen + glyphs.at(-1)!.xMax!) * scale, 6);
    // The H's ink starts right of the origin, by its left side bearing: measured from the ink the line
    // is that much shorter, which is how the bed's check used to measure it.
    expect(line().shape.bounds.minX).toBeCloseTo(glyphs[0]!.xMin! * scale, 6);
    expect(glyphs[0]!.xMin! * scale).toBeGreaterThan(0.4);
  });
});
