import { describe, expect, it } from "vitest";
import { loadFonts } from "@/tests/support/engine";
import { doesNotFit, roomForValues } from "./build-checks";
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
  return { mark, value: mark.value, shape: layoutText(font, mark.value, mark.size) };
}
const tooLong = (findings: { code: string; message: string }[]) => findings.filter((f) => f.code === "text_too_long");
const lengthIn = (message: string) => Number(/ is (\d+\.\d) mm long /.exec(message)![1]);

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

  it("near the limit both checks give the line the same length, and agree on whether it is too long", () => {
    const width = lineWidth(line().shape);
    const ink = line().shape.bounds.maxX - line().shape.bounds.minX;
    const o = parseOptions({});

    // 0.1 mm less room than the line takes; its ink alone would still fit.
    const short = Math.round((width - 0.1) * 100) / 100;
    expect(ink).toBeLessThan(short);
    const template = tooLong(roomForValues({ texts: [line(short)], qr: null, logo: null }));
    const bed = tooLong(doesNotFit(o, { needW: 0, maxW: short }, [line()]));
    expect(template).toHaveLength(1);
    expect(bed).toHaveLength(1);
    expect(lengthIn(bed[0]!.message)).toBe(lengthIn(template[0]!.message));
    expect(lengthIn(bed[0]!.message)).toBe(Number(width.toFixed(1)));

    // A hair more room than the line takes: neither calls it too long.
    const room = width + 0.01;
    expect(tooLong(roomForValues({ texts: [line(room)], qr: null, logo: null }))).toEqual([]);
    expect(tooLong(doesNotFit(o, { needW: 0, maxW: room }, [line()]))).toEqual([]);
  });
});
