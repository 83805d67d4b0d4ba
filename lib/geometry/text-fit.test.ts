/**
 * Text lines against their room: a line that fits keeps its size, a long one shrinks (read back from
 * the exported STL), one that cannot fit at a printable size is refused at its line and field, by as
 * much as the font's own metrics say.
 */
import type opentype from "opentype.js";
import { beforeAll, describe, expect, it } from "vitest";
import { engine } from "@/tests/support/engine";
import { box } from "@/tests/support/meshes";
import { slabAndPieces } from "@/tests/support/stl-bodies";
import { demoTemplate, STARTERS } from "@/lib/templates/starters";
import { buildPlate, type PlatePart } from "./build-plate";
import type { FontBook } from "./fonts";
import type { Kernel } from "./kernel";
import type { SlabOptionsInput } from "./options";
import { orientMesh } from "./orient";
import { templateBodySchema } from "./template";

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

const counters = (): PlatePart[] => [{ id: "cube", name: "Counter", mesh: orientMesh(box(6, 6, 6)), quantity: 2 }];
const build = (options: SlabOptionsInput, formats: "stl"[] = []) => buildPlate(kernel, { parts: counters(), options, fonts, formats });
const find = (r: ReturnType<typeof build>, code: string) => r.findings.filter((f) => f.code === code);
const textCodes = (r: ReturnType<typeof build>) =>
  r.findings.map((f) => f.code).filter((c) => c.startsWith("text_") || c === "does_not_fit");

/**
 * The font's own metrics through opentype.js, apart from the engine's layout: a DejaVu face has no OS/2
 * cap height, so the cap height is the H's glyf yMax; a glyph's ink is its glyf box (xMin…yMax).
 */
function metrics(font: opentype.Font, text: string, capHeight: number) {
  const em = (capHeight * font.unitsPerEm) / font.charToGlyph("H").yMax!;
  const scale = em / font.unitsPerEm;
  const glyphs = font.stringToGlyphs(text).filter((g) => g.numberOfContours !== 0 && g.xMax !== undefined);
  const all = font.stringToGlyphs(text);
  return {
    /** Ink top to ink bottom over every glyph. */
    inkHeight: (Math.max(...glyphs.map((g) => g.yMax!)) - Math.min(...glyphs.map((g) => g.yMin!))) * scale,
    /**
     * A line's length as a layout engine sets it, from the pen's origin to the last glyph's ink:
     * opentype.js's own getAdvanceWidth for every glyph but the last (kerning off: use faces without
     * kerning pairs here), then the last glyph's glyf xMax.
     */
    width: font.getAdvanceWidth(text.slice(0, -1), em, { kerning: false }) + all.at(-1)!.xMax! * scale,
  };
}

describe("a text line that fits its room", () => {
  it("keeps the size asked, with no finding, laid out at the font's own cap height", () => {
    const r = build({
      marks: {
        text: [
          { value: "ORDER 7", size: 5 },
          { value: "SAM OKAFOR", size: 4, maxWidth: 70 },
        ],
      },
    });
    expect(textCodes(r)).toEqual([]);
    const line = r.layout!.marks.filter((m) => m.kind === "text")[1]!;
    const { inkHeight } = metrics(fonts["sans-bold"], "SAM OKAFOR", 4);
    // Flattened within 0.01 mm of the curves (TEXT_TOLERANCE).
    expect(line.bounds.maxY - line.bounds.minY).toBeCloseTo(inkHeight, 1);
  });
});

describe("fit: shrink (the default)", () => {
  it("a long name is reduced step by step to fit its 70 mm; the exported slab carries it at the new size", () => {
    const value = "Thank you, Maximilian Featherstonehaugh!";
    const r = build(
      {
        marks: {
          // 0.3 mm deep, so the text's engraving floor is the only one at 0.7 mm (rings and numbers are cut 0.4).
          text: [
            { value: "ORDER 7", size: 5 },
            { value, size: 4, maxWidth: 70, depth: 0.3 },
          ],
        },
      },
      ["stl"],
    );
    expect(r.findings.filter((f) => f.severity === "error")).toEqual([]);
    const [f] = find(r, "text_shrunk");
    expect(f).toMatchObject({ severity: "warning", field: ["marks", "text", 1, "size"] });
    const m = /^Text line 2 \("Thank you, Maximilian Featherstonehaugh!"\) was reduced from 4 mm to (\d+(?:\.\d)?) mm/.exec(f!.message);
    expect(m).not.toBeNull();
    const size = Number(m![1]);
    expect(size).toBeLessThan(4);
    expect(size).toBeGreaterThanOrEqual(1);

    // Read back from the STL bytes: the slab's vertices on the text's engraving floor.
    const { slab } = slabAndPieces(r.stl!);
    let minX = Infinity,
      maxX = -Infinity,
      minY = Infinity,
      maxY = -Infinity;
    for (let i = 0; i < slab.tri.length; i += 3) {
      if (Math.abs(slab.tri[i + 2]! - 0.7) > 1e-4) continue;
      minX = Math.min(minX, slab.tri[i]!);
      maxX = Math.max(maxX, slab.tri[i]!);
      minY = Math.min(minY, slab.tri[i + 1]!);
      maxY = Math.max(maxY, slab.tri[i + 1]!);
    }
    const { inkHeight } = metrics(fonts["sans-bold"], value, size);
    expect(maxY - minY).toBeCloseTo(inkHeight, 1);
    expect(maxY - minY).toBeLessThan(metrics(fonts["sans-bold"], value, 4).inkHeight * 0.9);
    expect(maxX - minX).toBeLessThanOrEqual(70);
    // The largest step that fits: a tenth of a millimetre more and the same line is refused.
    const over = build({ marks: { text: [{ value, size: Math.round((size + 0.1) * 10) / 10, maxWidth: 70, fit: "refuse" }] } });
    expect(find(over, "text_too_long")).toHaveLength(1);
    // The shrunk line passes the plate's own stroke check.
    expect(find(r, "stroke_too_thin")).toEqual([]);
  });

  it("a line that would push the slab past the bed shrinks to what the bed leaves beside the QR code: never does_not_fit", () => {
    const r = build({
      layout: { bed: { width: 100, depth: 150 } },
      marks: {
        text: [
          { value: "ORDER 10482", size: 6 },
          { value: "Jordan Okafor", size: 4 },
        ],
        qr: { value: "https://shop.example/o/10482", module: 1 },
      },
    });
    expect(textCodes(r)).toEqual(["text_shrunk"]);
    expect(find(r, "text_shrunk")[0]!.message).toMatch(/^Text line 1 .*the 100 mm wide bed leaves it \d+\.\d mm .*QR code beside it/);
    expect(r.layout!.slab.width).toBeLessThanOrEqual(100);
    const [order] = r.layout!.marks.filter((m) => m.kind === "text");
    const qr = r.layout!.marks.find((m) => m.kind === "qr")!;
    expect(order!.bounds.maxX).toBeLessThan(qr.bounds.minX);
  });

  it("a line too long even at the smallest printable cap height is refused, naming line 2, its value and the overflow", () => {
    const value = "MAXIMILIANA FEATHERSTONEHAUGH-ABERNETHY";
    const font = fonts["mono-bold"];
    const r = build({
      marks: {
        text: [
          { value: "ORDER 7", size: 5 },
          { value, size: 4, font: "mono-bold", maxWidth: 40 },
        ],
      },
    });
    expect(textCodes(r)).toEqual(["text_too_long"]);
    const [f] = find(r, "text_too_long");
    expect(f).toMatchObject({ severity: "error", field: ["marks", "text", 1, "value"] });
    const m = /^Text line 2 \("MAXIMILIANA FEATHERSTONEHAUGH-ABERNETHY"\) is (\d+\.\d) mm too long: even at (\d+(?:\.\d)?) mm/.exec(
      f!.message,
    );
    expect(m).not.toBeNull();
    const floor = Number(m![2]);
    // DejaVu Sans Mono is monospaced with no kerning pairs (post.isFixedPitch): opentype.js's advance widths are the layout's.
    expect(Object.keys((font as unknown as { kerningPairs: object }).kerningPairs)).toHaveLength(0);
    expect(Number(m![1])).toBeCloseTo(metrics(font, value, floor).width - 40, 1);
    expect(f!.message).toMatch(/Use shorter text, a finer nozzle, or a larger maximum width/);
    expect(r.layout).toBeNull();
    expect(r.stl).toBeUndefined();

    // The floor is the plate checks' own stroke rule: at it the line prints, a step below it does not.
    const at = (size: number) => build({ marks: { text: [{ value, size, font: "mono-bold" }] } });
    expect(find(at(floor), "stroke_too_thin")).toEqual([]);
    expect(find(at(Math.round((floor - 0.1) * 10) / 10), "stroke_too_thin")).toHaveLength(1);
  });
});

describe("one measure for the template's room and the bed's", () => {
  it("near the limit, a line's maxWidth and the bed call it too long (or not) at the same length", () => {
    const value = "HILLSIDE";
    const line = (extra: object) => ({ value, size: 5, font: "mono-bold" as const, fit: "refuse" as const, ...extra });
    const width = metrics(fonts["mono-bold"], value, 5).width;
    const margin = 4;
    const lengthIn = (r: ReturnType<typeof build>) => Number(/ it is (\d+\.\d) mm long/.exec(find(r, "text_too_long")[0]!.message)![1]);
    // 0.1 mm less room than the line takes, from its maxWidth and from the bed less its margins.
    const short = Math.round((width - 0.1) * 100) / 100;
    const byTemplate = build({ marks: { text: [line({ maxWidth: short })] } });
    const byBed = build({ slab: { margin }, layout: { bed: { width: short + 2 * margin, depth: 200 } }, marks: { text: [line({})] } });
    expect(lengthIn(byTemplate)).toBe(Number(width.toFixed(1)));
    expect(lengthIn(byBed)).toBe(lengthIn(byTemplate));
    // A hair more room than the line takes: neither calls it too long.
    const room = width + 0.01;
    expect(textCodes(build({ marks: { text: [line({ maxWidth: room })] } }))).toEqual([]);
    expect(
      textCodes(build({ slab: { margin }, layout: { bed: { width: room + 2 * margin, depth: 200 } }, marks: { text: [line({})] } })),
    ).toEqual([]);
  });
});

describe('fit: "refuse"', () => {
  it("refuses at the size asked, says by how much and the size at which it would fit, and shrinks nothing", () => {
    const value = "JORDAN OKAFOR";
    const font = fonts["mono-bold"];
    const r = build({ marks: { text: [{ value: "ORDER 7" }, { value, size: 5, font: "mono-bold", maxWidth: 30, fit: "refuse" }] } });
    expect(textCodes(r)).toEqual(["text_too_long"]);
    const [f] = find(r, "text_too_long");
    expect(f).toMatchObject({ severity: "error", field: ["marks", "text", 1, "size"] });
    const m = /^Text line 2 \("JORDAN OKAFOR"\) is (\d+\.\d) mm too long: at 5 mm it is (\d+\.\d) mm long/.exec(f!.message);
    expect(m).not.toBeNull();
    expect(Number(m![2])).toBeCloseTo(metrics(font, value, 5).width, 1);
    expect(Number(m![1])).toBeCloseTo(metrics(font, value, 5).width - 30, 1);
    const fits = Number(/it fits at (\d+(?:\.\d)?) mm/.exec(f!.message)![1]);
    expect(metrics(font, value, fits).width).toBeLessThanOrEqual(30);
    expect(metrics(font, value, fits + 0.1).width).toBeGreaterThan(30);
    expect(r.layout).toBeNull();
    const ok = build({ marks: { text: [{ value: "ORDER 7" }, { value, size: fits, font: "mono-bold", maxWidth: 30, fit: "refuse" }] } });
    expect(textCodes(ok)).toEqual([]);
  });
});

describe("templates", () => {
  it("every text line of the starters and the demo template shrinks by default", () => {
    for (const t of [...STARTERS, demoTemplate()]) {
      const body = templateBodySchema.parse({ options: t.options, variables: t.variables });
      expect(body.options.marks.text.map((l) => l.fit)).toEqual(body.options.marks.text.map(() => "shrink"));
    }
  });
});
